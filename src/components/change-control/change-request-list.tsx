import { router } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { ChangeRequestSummary } from '../../contracts/change-requests';
import { fmt } from '../../format';
import { radius, space, touchTarget, useColors } from '../../theme';
import { Text } from '../ui';
import { STATUS_LABELS, STATUS_TONES } from './labels';

/** Change requests as tappable rows, newest first; each opens its record. */
export function ChangeRequestList({ items }: { items: ChangeRequestSummary[] }) {
  const c = useColors();
  return (
    <View style={styles.list} testID="change-request-list">
      {items.map((r) => (
        <Pressable
          key={r.id}
          accessibilityRole="link"
          onPress={() => router.push(`/sign-offs/${r.id}`)}
          testID={`change-request-${r.id}`}
          style={({ pressed }) => [styles.row, { borderColor: c.border, backgroundColor: pressed ? c.surfaceRaised : c.surface }]}
        >
          <View style={styles.main}>
            <Text weight="semibold">
              {r.recipeName} → {fmt(r.proposedSetpointC)} °C
            </Text>
            <Text variant="small" tone="muted">
              #{r.id} · {r.vesselName} · proposed by {r.proposedBy} · from {r.effectiveFrom}
            </Text>
            <Text variant="small" numberOfLines={2}>
              {r.rationale}
            </Text>
          </View>
          <Text variant="small" weight="semibold" tone={STATUS_TONES[r.status]} testID={`change-request-${r.id}-status`}>
            {STATUS_LABELS[r.status]}
          </Text>
        </Pressable>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.sm },
  row: {
    minHeight: touchTarget,
    borderWidth: 1,
    borderRadius: radius.lg,
    padding: space.lg,
    gap: space.sm,
    flexDirection: 'row',
    flexWrap: 'wrap',
    justifyContent: 'space-between',
  },
  main: { gap: space.xs, flexBasis: 260, flexGrow: 1, flexShrink: 1 },
});
