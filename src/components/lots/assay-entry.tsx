import { useState } from 'react';
import { Linking, StyleSheet, View } from 'react-native';
import type { ResidualScale } from '../../contracts/assays';
import { useUploadAssay } from '../../hooks/use-upload-assay';
import { space, useColors } from '../../theme';
import { Button, Card, Field, Text } from '../ui';
import { Choice } from '../ui/choice';
import { pickFile } from './pick-file';

type Row = { tempC: string; timeH: string; residual: string };
const EMPTY: Row = { tempC: '', timeH: '', residual: '' };
const SCALES = [
  { value: 'auto', label: 'Detect' },
  { value: 'fraction', label: 'Fraction' },
  { value: 'percent', label: 'Per cent' },
] as const;

/** Adding QC data to a lot: a CSV upload, or rows typed into a small table. Row problems come back by line. */
export function AssayEntry({ lotId }: { lotId: number }) {
  const c = useColors();
  const { submit, error, isBusy, clearError } = useUploadAssay(lotId);
  const [isTyping, setTyping] = useState(false);
  const [rows, setRows] = useState<Row[]>([{ ...EMPTY }, { ...EMPTY }, { ...EMPTY }]);
  const [scale, setScale] = useState<'auto' | ResidualScale>('auto');
  const [done, setDone] = useState<string | null>(null);
  const problems = Object.entries(error?.fields ?? {});
  const setCell = (i: number, k: keyof Row) => (t: string) => setRows((rs) => rs.map((r, j) => (j === i ? { ...r, [k]: t } : r)));
  return (
    <Card testID="assay-entry">
      <Text variant="title">Add QC assay data</Text>
      <Text variant="small" tone="muted">
        Residual activity against time at two or more temperatures. CSV columns: temperature (°C), time (h), residual activity as a fraction or per cent
        (detected and stated), optional note. Up to 100,000 rows and 20 MB. A file with any bad row is not saved.
      </Text>
      <View style={styles.row}>
        <Button
          label="Upload CSV"
          isBusy={isBusy && !isTyping}
          testID="assay-upload"
          onPress={async () => {
            setDone(null);
            clearError();
            const picked = await pickFile(['text/csv', '.csv', 'text/plain']);
            if (!picked) return;
            const assay = await submit(picked);
            if (assay) setDone(`${assay.pointCount} points from ${picked.name}. ${assay.scaleNote}`);
          }}
        />
        <Button label="Download template CSV" variant="secondary" onPress={() => Linking.openURL('/api/lots/assay-template')} testID="assay-template" />
        <Button label={isTyping ? 'Hide table' : 'Type values instead'} variant="ghost" onPress={() => setTyping(!isTyping)} testID="assay-type-toggle" />
      </View>
      {isTyping ? (
        <View style={styles.table} testID="assay-table-entry">
          {rows.map((r, i) => (
            <View key={i} style={styles.tableRow}>
              <View style={styles.cell}>
                <Field label={`Row ${i + 1} temperature, °C`} value={r.tempC} onChangeText={setCell(i, 'tempC')} keyboardType="decimal-pad" />
              </View>
              <View style={styles.cell}>
                <Field label="time, h" value={r.timeH} onChangeText={setCell(i, 'timeH')} keyboardType="decimal-pad" />
              </View>
              <View style={styles.cell}>
                <Field label="residual" value={r.residual} onChangeText={setCell(i, 'residual')} keyboardType="decimal-pad" />
              </View>
            </View>
          ))}
          <View style={styles.row}>
            <Button label="Add row" variant="secondary" compact onPress={() => setRows((rs) => [...rs, { ...EMPTY }])} />
            <Button label="Remove last row" variant="ghost" compact disabled={rows.length <= 1} onPress={() => setRows((rs) => rs.slice(0, -1))} />
          </View>
          <Choice compact label="Residual activity is" value={scale} options={SCALES} onChange={setScale} />
          <Button
            label="Save typed rows"
            isBusy={isBusy}
            onPress={async () => {
              setDone(null);
              const filled = rows.filter((r) => r.tempC || r.timeH || r.residual);
              const assay = await submit({
                rows: filled.map((r) => ({ tempC: r.tempC, timeH: r.timeH, residual: r.residual })),
                scale: scale === 'auto' ? undefined : scale,
              });
              if (assay) setDone(`${assay.pointCount} typed points saved. ${assay.scaleNote}`);
            }}
          />
        </View>
      ) : null}
      {done ? (
        <Text tone="success" accessibilityLiveRegion="polite" testID="assay-done">
          {done}
        </Text>
      ) : null}
      {error ? (
        <View accessibilityRole="alert" testID="assay-error" style={[styles.problems, { borderColor: c.danger }]}>
          <Text tone="danger" weight="semibold">
            {error.message}
          </Text>
          {problems.map(([where, why]) => (
            <Text key={where} variant="small">
              {where}: {why}
            </Text>
          ))}
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  table: { gap: space.sm },
  tableRow: { flexDirection: 'row', gap: space.sm },
  cell: { flex: 1 },
  problems: { borderLeftWidth: 3, paddingLeft: space.md, gap: space.xs },
});
