import { Pressable, StyleSheet, View } from 'react-native';
import { space, useBreakpoint, useColors } from '../../theme';
import { Text } from './text';

export type Column<T> = {
  key: string;
  label: string;
  value: (row: T) => string;
  isNumeric?: boolean;
  flex?: number;
  /** A status colour for the value, on a phone and a wide screen alike. */
  tone?: (row: T) => 'success' | 'warning' | 'danger' | 'muted' | undefined;
  /** A code kept on one line (lot codes must not break at their hyphens). */
  isCode?: boolean;
};

const cellStyle = <T,>(col: Column<T>) => (col.isCode ? styles.code : styles.wrapAnywhere);

type Props<T> = {
  columns: Column<T>[];
  rows: T[];
  rowKey: (row: T) => string;
  caption: string;
  testID?: string;
  /** Makes each row a link, e.g. to the record's detail, named by its visible text (WCAG 2.5.3). */
  onRowPress?: (row: T) => void;
};

/** A row that opens its record when the table has `onRowPress`; inside a table it keeps the row role (ARIA needs it). */
function Row({ onPress, style, testID, children, role }: { onPress?: () => void; style: object[]; testID?: string; children: React.ReactNode; role?: 'row' }) {
  if (!onPress)
    return (
      <View role={role} style={style} testID={testID}>
        {children}
      </View>
    );
  return (
    <Pressable role={role ?? 'link'} onPress={onPress} style={({ pressed }) => [...style, pressed && { opacity: 0.7 }]} testID={testID}>
      {children}
    </Pressable>
  );
}

// Below this width a row becomes a small card of label/value pairs instead of a cramped table row.
const TABLE_MIN_WIDTH = 640;

/** Rows of records: a table on wide screens, stacked label/value cards on a phone. */
export function DataTable<T>({ columns, rows, rowKey, caption, testID, onRowPress }: Props<T>) {
  const c = useColors();
  const { width } = useBreakpoint();
  if (width < TABLE_MIN_WIDTH) {
    return (
      <View testID={testID} accessibilityLabel={caption} style={styles.list}>
        {rows.map((row) => (
          <Row
            key={rowKey(row)}
            onPress={onRowPress && (() => onRowPress(row))}
            style={[styles.card, { borderColor: c.border, backgroundColor: c.surface }]}
            testID={testID ? `${testID}-row` : undefined}
          >
            {/* The first column names the card; a lone second column is its value, with no repeated header beside it. */}
            <Text variant="small" weight="semibold" tone={columns[0]!.tone?.(row)} style={cellStyle(columns[0]!)}>
              {columns[0]!.value(row)}
            </Text>
            {columns.length === 2 ? (
              <Text variant="small" tone={columns[1]!.tone?.(row)} style={cellStyle(columns[1]!)}>
                {columns[1]!.value(row)}
              </Text>
            ) : (
              columns.slice(1).map((col) => (
                <View key={col.key} style={styles.pair}>
                  <Text variant="small" tone="muted">
                    {col.label}
                  </Text>
                  <Text variant="small" tone={col.tone?.(row)} weight={col.tone ? 'semibold' : undefined} style={[styles.pairValue, cellStyle(col)]}>
                    {col.value(row)}
                  </Text>
                </View>
              ))
            )}
          </Row>
        ))}
      </View>
    );
  }
  return (
    <View testID={testID} role="table" aria-label={caption} style={[styles.table, { borderColor: c.border, backgroundColor: c.surface }]}>
      <View role="row" style={[styles.row, { borderColor: c.border }]}>
        {columns.map((col) => (
          <View key={col.key} role="columnheader" style={[styles.cell, { flex: col.flex ?? 1 }]}>
            <Text variant="small" weight="semibold" tone="muted" style={col.isNumeric && styles.right}>
              {col.label}
            </Text>
          </View>
        ))}
      </View>
      {rows.map((row) => (
        <Row
          key={rowKey(row)}
          role="row"
          onPress={onRowPress && (() => onRowPress(row))}
          style={[styles.row, { borderColor: c.border }]}
          testID={testID ? `${testID}-row` : undefined}
        >
          {columns.map((col) => (
            <View key={col.key} role="cell" style={[styles.cell, { flex: col.flex ?? 1 }]}>
              <Text
                variant="small"
                tone={col.tone?.(row)}
                weight={col.tone ? 'semibold' : undefined}
                style={[col.isNumeric && styles.right, col.isCode && styles.code]}
              >
                {col.value(row)}
              </Text>
            </View>
          ))}
        </Row>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.sm },
  card: { borderWidth: 1, borderRadius: 10, padding: space.md, gap: space.xxs },
  pair: { flexDirection: 'row', justifyContent: 'space-between', gap: space.md },
  pairValue: { flexShrink: 1, textAlign: 'right' },
  // A hash or a code with no space breaks inside rather than running off a phone's edge (react-native-web style).
  wrapAnywhere: { wordBreak: 'break-word' } as object,
  code: { whiteSpace: 'nowrap' } as object,
  table: { borderWidth: 1, borderRadius: 10, overflow: 'hidden' },
  row: { flexDirection: 'row', borderBottomWidth: StyleSheet.hairlineWidth, minHeight: 44, alignItems: 'center' },
  cell: { paddingHorizontal: space.md, paddingVertical: space.sm },
  right: { textAlign: 'right' },
});
