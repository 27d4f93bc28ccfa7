import { router } from 'expo-router';
import { Linking, Platform, StyleSheet, View } from 'react-native';
import type { ChangeRequestDetail } from '../../contracts/change-requests';
import { can } from '../../contracts/permissions';
import type { SessionUser } from '../../contracts/session';
import { fmt } from '../../format';
import { space } from '../../theme';
import { CalibrationReview } from '../calibration/calibration-review';
import { EvidenceNote } from '../evidence/evidence-note';
import { Button, Card, Columns, DataTable, Text, type Column } from '../ui';
import { Comparison } from './comparison';
import { closedBecause, STATUS_LABELS, STATUS_TONES } from './labels';
import { SignForm } from './sign-form';
import { SignatureList } from './signature-list';
import { canSee } from '../shell/navigation';
import { pricesText } from '../planner/plan-sheet';
import { useSiteFormat } from '../../hooks/use-site-format';

type Row = { label: string; value: string };
const COLUMNS: Column<Row>[] = [
  { key: 'label', label: 'Input', value: (r) => r.label, flex: 1.2 },
  { key: 'value', label: 'Value', value: (r) => r.value, flex: 1.6 },
];

function inputRows(d: ChangeRequestDetail, currency: string): Row[] {
  const i = d.plan.inputs;
  const k = d.plan.outputs.kinetics;
  return [
    { label: 'Lot', value: d.plan.lotCode },
    { label: 'Strategy', value: i.strategy === 'staged' ? `Staged, ${i.stages} stages, steps ≤ ${fmt(i.maxStepC)} °C` : 'Isothermal' },
    { label: 'Batch length / turnaround', value: `${fmt(i.batchH)} h / ${fmt(i.turnaroundH)} h` },
    { label: 'Dose', value: `${fmt(i.doseGPerL, 2)} g/L` },
    { label: 'Substrate S0 / Km', value: `${fmt(i.s0GPerL, 0)} / ${fmt(i.kmGPerL, 2)} g/L` },
    { label: 'Stability', value: `kd ${k.kdRefPerH.toPrecision(3)} /h at ${fmt(k.tRefC, 0)} °C, Ed ${fmt(k.edKJPerMol, 0)} kJ/mol (${k.stabilitySource})` },
    { label: 'Prices', value: pricesText(i, currency) },
    { label: 'Uncertainty run', value: i.uncertainty ? `${i.uncertainty.draws} draws, seed ${i.uncertainty.seed}` : 'Not run' },
    { label: 'Model version', value: d.plan.modelVersion },
  ];
}

/** A change request as a record: what is proposed against what runs now, why, the plan's inputs and every signature. */
export function ChangeRequestRecord({ detail: d, user }: { detail: ChangeRequestDetail; user: SessionUser }) {
  const canSign = can(user.role, 'change-requests.sign') && d.status === 'proposed';
  const isOwn = d.proposedById === user.id;
  const cautions = d.plan.outputs.cautions;
  const site = useSiteFormat();
  return (
    <>
      <View style={styles.headline}>
        <Text variant="title" tone={STATUS_TONES[d.status]} testID="record-status">
          {STATUS_LABELS[d.status]}
        </Text>
        <Text tone="muted" testID="record-meta">
          #{d.id} · {d.recipeName} in {d.vesselName} · proposed by {d.proposedBy}, {site.stamp(d.createdAt)} · effective from {d.effectiveFrom} (
          {d.siteTimeZone})
        </Text>
      </View>
      <View style={styles.actions} testID="record-actions">
        <Button label="Print" variant="secondary" onPress={() => (Platform.OS === 'web' ? window.print() : undefined)} testID="record-print" />
        <Button label="Export CSV" variant="secondary" onPress={() => Linking.openURL(`/api/change-requests/${d.id}/export.csv`)} testID="record-csv" />
        {canSee(user.role, 'planner') ? <Button label="Open the plan" variant="ghost" onPress={() => router.push(`/planner/plan/${d.planId}`)} /> : null}
      </View>
      {d.supersededBy !== null ? (
        <Card testID="record-closed">
          <Text weight="semibold">{closedBecause(d.status, d.supersededBy)}</Text>
          <View style={styles.actions}>
            <Button
              label={`Open request #${d.supersededBy}`}
              variant="secondary"
              onPress={() => router.push(`/sign-offs/${d.supersededBy}`)}
              testID="record-open-superseding"
            />
          </View>
        </Card>
      ) : null}
      {!d.isIntact ? (
        <Card accessibilityRole="alert" testID="record-changed">
          <Text tone="danger" weight="semibold">
            This record changed after it was submitted
          </Text>
          <Text tone="muted">The stored plan or request no longer matches the submitted hash. It cannot be signed; ask for a new proposal.</Text>
        </Card>
      ) : null}
      <Columns>
        <>
          <Card>
            <Text variant="title" accessibilityRole="header">
              Current and proposed
            </Text>
            <Comparison current={d.current} proposed={d.proposed} />
            {cautions.crossesBoiling ? <Text tone="warning">Above 100 °C: a pressurised operation for a water-based batch.</Text> : null}
            {cautions.belowHygienicMin ? (
              <Text tone="warning">Holds the batch below the vessel’s hygienic minimum of {fmt(cautions.hygienicMinC)} °C.</Text>
            ) : null}
          </Card>
          <Card>
            <Text variant="title" accessibilityRole="header">
              Why
            </Text>
            <Text testID="record-rationale">{d.rationale}</Text>
            <Text variant="small" weight="semibold">
              Expected effect
            </Text>
            <Text>{d.expectedEffect}</Text>
          </Card>
          <Card>
            <Text variant="title" accessibilityRole="header">
              Plan #{d.planId} inputs
            </Text>
            <DataTable columns={COLUMNS} rows={inputRows(d, site.currency)} rowKey={(r) => r.label} caption="Plan inputs" testID="record-inputs" />
            <EvidenceNote evidence={d.plan.outputs.kinetics.evidence} olderEvidence={d.plan.olderEvidence} testID="record-evidence" />
          </Card>
        </>
        <>
          <Card>
            <Text variant="title" accessibilityRole="header">
              Signatures
            </Text>
            <SignatureList items={d.signatures} />
            <Text variant="caption" tone="muted" selectable testID="record-hash">
              Record hash (sha256 of the plan and request) {d.recordHash}
            </Text>
          </Card>
          {canSign && isOwn ? (
            <Card testID="sign-own">
              <Text tone="muted">You proposed this change, so another supervisor signs it.</Text>
            </Card>
          ) : canSign && d.isIntact ? (
            <SignForm id={d.id} signerName={user.name} recordHash={d.recordHash} />
          ) : null}
        </>
      </Columns>
      {/* The supervisor signs with the model's track record for this recipe and lot in view. */}
      <CalibrationReview recipeId={d.recipeId} lotId={d.plan.inputs.lotId} canDecide={false} />
      <Text variant="small" tone="muted">
        Advisory. The released setpoint is set on the vessel by qualified staff under the site’s procedures; Yieldpoint never writes to a control system.
      </Text>
    </>
  );
}

const styles = StyleSheet.create({
  headline: { gap: space.xs },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
