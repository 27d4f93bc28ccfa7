import { router } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { durationText } from '../../batches';
import type { BatchSummary } from '../../contracts/batches';
import { fmt } from '../../format';
import { useSiteFormat } from '../../hooks/use-site-format';
import { radius, space, touchTarget, useColors } from '../../theme';
import { Text } from '../ui/text';

/**
 * One batch in the list: what runs where, how it is going, and whether anything needs attention. The link's name
 * is its visible text (WCAG 2.5.3), deviations included.
 */
export function BatchCard({ b, now }: { b: BatchSummary; now: Date }) {
  const c = useColors();
  const site = useSiteFormat();
  const since = b.lastReadingAt ? `last reading ${durationText(now.getTime() - Date.parse(b.lastReadingAt))} ago` : 'no readings yet';
  const outcome =
    b.state === 'running'
      ? `Forecast ${fmt(b.forecastGPerL)} g/L (plan ${fmt(b.plannedProductGPerL)})`
      : `Forecast ${fmt(b.forecastGPerL)} g/L · measured ${b.measuredProductGPerL === null ? 'not recorded' : `${fmt(b.measuredProductGPerL)} g/L`}`;
  return (
    <Pressable
      accessibilityRole="link"
      testID={`batch-card-${b.id}`}
      onPress={() => router.push(`/batches/${b.id}`)}
      style={({ pressed }) => [styles.card, { backgroundColor: c.surface, borderColor: b.openDeviations ? c.danger : c.border }, pressed && { opacity: 0.85 }]}
    >
      <View style={styles.top}>
        <Text weight="semibold" style={styles.grow}>
          {b.recipeName}
        </Text>
        {b.openDeviations ? (
          <Text variant="small" weight="semibold" tone="danger">
            {b.openDeviations} deviation{b.openDeviations > 1 ? 's' : ''}
          </Text>
        ) : null}
      </View>
      <Text variant="small" tone="muted">
        {b.vesselName} · lot {b.lotCode} · started {site.time(b.startedAt, now)}
        {b.state === 'running' ? ` · ${since}` : ''}
      </Text>
      <Text variant="small">{outcome}</Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  card: { minHeight: touchTarget, borderWidth: 1, borderRadius: radius.lg, padding: space.md, gap: space.xxs },
  top: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  grow: { flex: 1 },
});
