import { Children } from 'react';
import { StyleSheet, View } from 'react-native';
import { space, useBreakpoint } from '../../theme';

type Props = { children: React.ReactNode; gap?: number; testID?: string };

/**
 * Side-by-side columns on a wide screen, one stacked column on a phone. One place for the rule that `flex: 1`
 * belongs only beside another column: in a phone's single column it has a zero basis, so a column shrinks below
 * its content and the next section is drawn over it.
 */
export function Columns({ children, gap = space.lg, testID }: Props) {
  const { isWide } = useBreakpoint();
  const items = Children.toArray(children).filter(Boolean);
  return (
    <View testID={testID} style={[{ gap }, isWide && styles.row]}>
      {items.map((child, i) => (
        <View key={i} style={[{ gap }, isWide && styles.column]}>
          {child}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'flex-start' },
  column: { flex: 1, minWidth: 0 },
});
