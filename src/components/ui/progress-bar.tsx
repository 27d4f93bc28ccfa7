import { StyleSheet, View } from 'react-native';
import { radius, space, useColors } from '../../theme';

/** A determinate progress bar (0..1) that screen readers announce with its percentage. */
export function ProgressBar({ value, label, testID }: { value: number; label: string; testID?: string }) {
  const c = useColors();
  const pct = Math.round(Math.min(1, Math.max(0, value)) * 100);
  return (
    <View
      accessibilityRole="progressbar"
      accessibilityLabel={label}
      accessibilityValue={{ min: 0, max: 100, now: pct }}
      testID={testID}
      style={[styles.track, { backgroundColor: c.border }]}
    >
      <View style={[styles.fill, { width: `${pct}%`, backgroundColor: c.primary }]} />
    </View>
  );
}

const styles = StyleSheet.create({
  track: { height: space.sm, borderRadius: radius.pill, overflow: 'hidden' },
  fill: { height: '100%', borderRadius: radius.pill },
});
