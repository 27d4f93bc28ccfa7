import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Corrective, Deviation } from '../../contracts/batches';
import { can } from '../../contracts/permissions';
import type { Role } from '../../contracts/roles';
import { fmt } from '../../format';
import { useAcknowledgeDeviation } from '../../hooks/use-acknowledge-deviation';
import { useCloseDeviation } from '../../hooks/use-close-deviation';
import { radius, space, useColors } from '../../theme';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { Field } from '../ui/field';
import { Text } from '../ui/text';
import { useSiteFormat } from '../../hooks/use-site-format';

const KIND: Record<Deviation['kind'], string> = {
  band: 'Outside the tolerance band',
  gap: 'Gap between readings',
  vessel_max: 'Above the vessel maximum',
  forecast_low: 'Forecast below the plan’s P10',
  signal_lost: 'Control-system signal lost',
};
const STATE: Record<Deviation['state'], string> = { open: 'Open', acknowledged: 'Acknowledged', closed: 'Closed' };

function Suggestion({ d }: { d: NonNullable<Deviation['corrective']> }) {
  const gain = d.forecastGPerL - d.planForecastGPerL;
  return (
    <Text variant="small" testID="deviation-corrective">
      Suggested for the rest of the batch: hold {fmt(d.setpointC)} °C from hour {fmt(d.fromH)} ({fmt(d.remainingH)} h left, within {fmt(d.boundsC[0], 0)}–
      {fmt(d.boundsC[1], 0)} °C). Forecast {fmt(d.forecastGPerL)} g/L against {fmt(d.planForecastGPerL)} g/L back on the plan
      {Math.abs(gain) < 0.05 ? ' — the plan is as good.' : ` (${gain > 0 ? '+' : ''}${fmt(gain)} g/L).`} Advisory only: setpoint changes go through the site’s
      procedure.
    </Text>
  );
}

function DeviationItem({ d, role, current }: { d: Deviation; role: Role; current: Corrective | null }) {
  const c = useColors();
  const site = useSiteFormat();
  const [comment, setComment] = useState('');
  const ack = useAcknowledgeDeviation();
  const close = useCloseDeviation();
  const canAck = d.state === 'open' && can(role, 'deviations.acknowledge');
  const canClose = d.state === 'acknowledged' && can(role, 'deviations.close');
  const tone = d.state === 'open' ? 'danger' : d.state === 'acknowledged' ? 'warning' : 'muted';
  return (
    <View style={[styles.item, { borderColor: d.state === 'open' ? c.danger : c.border }]} testID={`deviation-${d.id}`}>
      <View style={styles.head}>
        <Text weight="semibold" style={styles.grow}>
          {KIND[d.kind]}
        </Text>
        <Text variant="small" weight="semibold" tone={tone} testID={`deviation-state-${d.id}`}>
          {STATE[d.state]}
        </Text>
      </View>
      <Text variant="small" tone="muted">
        {site.time(d.at)}
      </Text>
      <Text variant="small">{d.message}</Text>
      {/* The suggestion from the latest reading replaces the one stored when the deviation was raised (kept in the report). */}
      {d.corrective && d.state !== 'closed' ? <Suggestion d={current ?? d.corrective} /> : null}
      {d.acknowledgedBy ? (
        <Text variant="small" tone="muted">
          Acknowledged by {d.acknowledgedBy}: “{d.acknowledgeComment}”
        </Text>
      ) : null}
      {d.closedBy ? (
        <Text variant="small" tone="muted">
          Closed by {d.closedBy}
          {d.closeComment ? `: “${d.closeComment}”` : ''}
        </Text>
      ) : null}
      {canAck || canClose ? (
        <>
          <Field
            label={canAck ? 'What happened, what you did' : 'Closing comment (optional)'}
            value={comment}
            onChangeText={setComment}
            testID={`deviation-comment-${d.id}`}
            error={(canAck ? ack.error : close.error)?.fields?.comment ?? (canAck ? ack.error : close.error)?.message}
          />
          <Button
            label={canAck ? 'Acknowledge' : 'Close deviation'}
            isBusy={ack.isBusy || close.isBusy}
            testID={canAck ? `deviation-acknowledge-${d.id}` : `deviation-close-${d.id}`}
            onPress={() => void (canAck ? ack.submit(d.id, comment.trim()) : close.submit(d.id, comment.trim()))}
          />
        </>
      ) : null}
    </View>
  );
}

/** The batch's deviations, open ones first, with the step each role can take. */
export function DeviationList({ deviations, role, current }: { deviations: Deviation[]; role: Role; current: Corrective | null }) {
  const order = { open: 0, acknowledged: 1, closed: 2 } as const;
  const sorted = [...deviations].sort((a, b) => order[a.state] - order[b.state] || b.id - a.id);
  const open = deviations.filter((d) => d.state !== 'closed').length;
  return (
    <Card testID="deviations">
      <Text variant="title" accessibilityRole="header">
        Deviations
      </Text>
      <Text variant="small" tone={open ? 'danger' : 'muted'} testID="deviations-summary">
        {deviations.length ? `${open} of ${deviations.length} not yet closed` : 'None so far.'}
      </Text>
      {sorted.map((d) => (
        <DeviationItem key={d.id} d={d} role={role} current={current} />
      ))}
    </Card>
  );
}

const styles = StyleSheet.create({
  item: { borderWidth: 1, borderRadius: radius.md, padding: space.md, gap: space.xs },
  head: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  grow: { flex: 1 },
});
