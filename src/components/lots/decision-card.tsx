import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { LotDetail } from '../../contracts/lots';
import { useDecideLot } from '../../hooks/use-decide-lot';
import { fmt } from '../../format';
import { space, useColors } from '../../theme';
import { Button, Card, Field, Text } from '../ui';

const RECOMMENDATION = { accept: 'Meets the specification', reject: 'Does not meet the specification', 'assay-needed': 'Needs an assay' } as const;
const BASIS = { assay: 'Lower 95 % bound of the assay fit', certificate: 'Certificate figure (no assay yet)', none: 'No usable figure' } as const;

/** The evaluation against specification, and procurement's decision with a reason. */
export function DecisionCard({ detail, canDecide }: { detail: LotDetail; canDecide: boolean }) {
  const c = useColors();
  const { lot, evaluation: ev } = detail;
  const { submit, error, isBusy } = useDecideLot(lot.id);
  const [reason, setReason] = useState('');
  const tone = ev.recommendation === 'accept' ? 'success' : ev.recommendation === 'reject' ? 'danger' : 'warning';
  return (
    <Card testID="decision-card" style={{ borderLeftWidth: 4, borderLeftColor: c[tone] }}>
      <Text variant="small" tone="muted">
        Against the specification: half-life at least {fmt(ev.specMinHalfLifeH, 1)} h at {fmt(ev.specTempC, 0)} °C
      </Text>
      <Text variant="title" tone={tone} testID="lot-recommendation">
        {RECOMMENDATION[ev.recommendation]}
      </Text>
      <Text testID="lot-evaluation">{ev.summary}</Text>
      <Text variant="small" tone="muted">
        Compared figure: {ev.comparedH === null ? '–' : `${fmt(ev.comparedH, 1)} h`} · {BASIS[ev.basis]}
      </Text>
      {lot.status !== 'quarantined' ? (
        <Text weight="semibold" testID="lot-decision">
          {lot.status === 'accepted' ? 'Accepted' : 'Rejected'}
          {detail.decidedBy ? ` by ${detail.decidedBy}` : ''}
          {lot.decidedAt ? ` on ${lot.decidedAt.slice(0, 10)}` : ''}: {lot.decisionReason}
        </Text>
      ) : canDecide ? (
        <View style={styles.decide}>
          <Field
            label="Reason for the decision (recorded in the audit trail)"
            value={reason}
            onChangeText={setReason}
            error={error?.fields?.reason}
            multiline
            testID="decision-reason"
          />
          {error && !error.fields?.reason ? <Text tone="danger">{error.message}</Text> : null}
          <View style={styles.row}>
            <Button label="Accept lot" isBusy={isBusy} testID="decision-accept" onPress={() => submit({ decision: 'accept', reason })} />
            <Button label="Reject lot" variant="danger" isBusy={isBusy} testID="decision-reject" onPress={() => submit({ decision: 'reject', reason })} />
          </View>
          <Text variant="caption" tone="muted">
            Yieldpoint advises; the decision is yours. Only accepted lots can be used in plans and batches.
          </Text>
        </View>
      ) : (
        <Text tone="muted">Awaiting procurement's decision.</Text>
      )}
    </Card>
  );
}

const styles = StyleSheet.create({ decide: { gap: space.sm }, row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm } });
