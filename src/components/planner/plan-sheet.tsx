import { router } from 'expo-router';
import { Linking, Platform, StyleSheet, View } from 'react-native';
import type { Plan } from '../../contracts/plans';
import { fmt, money } from '../../format';
import { space } from '../../theme';
import { EvidenceNote } from '../evidence/evidence-note';
import { Button, Card, DataTable, Text, type Column } from '../ui';
import { useSiteFormat } from '../../hooks/use-site-format';

type Row = { label: string; value: string };
const COLUMNS: Column<Row>[] = [
  { key: 'label', label: 'Item', value: (r) => r.label, flex: 1.2 },
  { key: 'value', label: 'Value', value: (r) => r.value, flex: 1.6 },
];

const SPREAD_LABELS = { fit: 'assay fit covariance', calibration: 'calibration covariance', default: 'default spread' } as const;

/** The plan's prices in the site's currency, as the plan and its change request print them. */
export const pricesText = (i: Pick<Plan['inputs'], 'productPricePerKg' | 'enzymePricePerKg' | 'heatingCostPerDegCHour'>, currency: string) =>
  `product ${money(i.productPricePerKg, currency)}/kg, enzyme ${money(i.enzymePricePerKg, currency)}/kg, heating ${money(i.heatingCostPerDegCHour, currency)} per °C·h`;

/** A saved plan as the server computed and stored it: the printable record change control will sign. */
export function PlanSheet({ plan }: { plan: Plan }) {
  const o = plan.outputs;
  const i = plan.inputs;
  const u = o.uncertainty;
  const site = useSiteFormat();
  // The temperatures the plan holds (its stages, or its one setpoint), not the vessel's whole range.
  const held = o.stages ? o.stages.map((s) => s.c) : [o.setpointC];
  const planRange = Math.min(...held) === Math.max(...held) ? fmt(held[0]!) : `${fmt(Math.min(...held))}–${fmt(Math.max(...held))}`;
  const result: Row[] = [
    {
      label: o.strategy === 'staged' ? 'Profile' : 'Setpoint',
      value: o.stages ? o.stages.map((s) => `${fmt(s.hours)} h at ${fmt(s.c)} °C`).join(', ') : `${fmt(o.setpointC)} °C`,
    },
    { label: 'Predicted product (ramps included)', value: `${fmt(o.predictedProductGPerL)} g/L` },
    {
      label: 'P10 / P50 / P90 (setpoint held)',
      value: u ? `${fmt(u.p10)} / ${fmt(u.p50)} / ${fmt(u.p90)} g/L, ${u.draws} draws, seed ${u.seed}, ${SPREAD_LABELS[u.parameterSpread]}` : 'Not run',
    },
    { label: 'Robust setpoint', value: u ? `${fmt(u.robustSetpointC)} °C (P10 ${fmt(u.robustP10)} g/L)` : '–' },
    { label: 'Activity left at the end', value: `${fmt(o.activityLeft * 100, 0)} %` },
    { label: 'Profit per reactor hour', value: site.money(o.profitPerH, 1) },
    {
      label: 'Current setpoint',
      value: `${fmt(o.current.setpointC)} °C: ${fmt(o.current.productGPerL)} g/L, ${fmt(o.current.activityLeft * 100, 0)} % activity left`,
    },
    { label: 'Gain over current', value: `${fmt(o.gainOverCurrent * 100)} %` },
    ...(o.earlyFinish
      ? [
          {
            label: 'Substrate fully converted',
            value: `by hour ${fmt(o.earlyFinish.completeAtH)}: a batch ended then earns ${site.money(o.earlyFinish.shorterProfitPerH, 0)} per reactor hour against ${site.money(o.earlyFinish.fullProfitPerH, 0)} for the full ${fmt(i.batchH, 0)} h`,
          },
        ]
      : []),
    {
      label: 'Range the plan uses',
      value: `${planRange} °C, within the vessel’s ${fmt(o.boundsC[0])}–${fmt(o.boundsC[1])} °C${o.atBound ? ` (at its ${o.atBound === 'upper' ? 'maximum' : 'minimum'})` : ''}`,
    },
    { label: 'Constraints met', value: o.constraintsMet ? 'Yes' : 'No' },
    {
      label: 'Pressure caution',
      value: o.cautions.crossesBoiling
        ? `Yes: ${fmt(o.cautions.maxC)} °C, ${fmt(o.cautions.saturationKPa, 0)} kPa abs saturation`
        : 'No (stays at or below 100 °C)',
    },
    { label: 'Below hygienic minimum', value: o.cautions.belowHygienicMin ? `Yes (${fmt(o.cautions.hygienicMinC)} °C)` : 'No' },
  ];
  const inputs: Row[] = [
    { label: 'Lot', value: plan.lotCode },
    { label: 'Batch length / turnaround', value: `${fmt(i.batchH)} h / ${fmt(i.turnaroundH)} h` },
    { label: 'Dose', value: `${fmt(i.doseGPerL, 2)} g/L (Vmax ${fmt(o.kinetics.vmaxRefGPerLH, 2)} g/L/h at ${fmt(o.kinetics.tRefC, 0)} °C)` },
    { label: 'Substrate S0 / Km', value: `${fmt(i.s0GPerL, 0)} / ${fmt(i.kmGPerL, 2)} g/L` },
    {
      label: 'Stability',
      value: `kd ${o.kinetics.kdRefPerH.toPrecision(3)} /h at ${fmt(o.kinetics.tRefC, 0)} °C, Ed ${fmt(o.kinetics.edKJPerMol, 0)} kJ/mol, Ea ${fmt(o.kinetics.eaKJPerMol, 0)} kJ/mol (${o.kinetics.stabilitySource})`,
    },
    { label: 'Prices', value: pricesText(i, site.currency) },
    { label: 'Staged search', value: `${i.stages} stages, steps at most ${fmt(i.maxStepC)} °C` },
    { label: 'Model version', value: plan.modelVersion },
    { label: 'Content hash (sha256)', value: plan.contentHash },
  ];
  return (
    <>
      <Text tone="muted" testID="plan-meta">
        Plan {plan.id} · {plan.recipeName} in {plan.vesselName} · saved {site.stamp(plan.createdAt)} by {plan.createdBy}
      </Text>
      <EvidenceNote evidence={o.kinetics.evidence} olderEvidence={plan.olderEvidence} showDisagreement testID="plan-evidence" />
      <View style={styles.actions} testID="plan-actions">
        <Button label="Print" variant="secondary" onPress={() => (Platform.OS === 'web' ? window.print() : undefined)} testID="plan-print" />
        <Button label="Export CSV" variant="secondary" onPress={() => Linking.openURL(`/api/plans/${plan.id}/export.csv`)} testID="plan-csv" />
        <Button label="Back to the planner" variant="ghost" onPress={() => router.push(`/planner/${plan.recipeId}`)} />
      </View>
      <Card>
        <Text variant="title" accessibilityRole="header">
          Result, as recomputed by the server
        </Text>
        <DataTable columns={COLUMNS} rows={result} rowKey={(r) => r.label} caption="Plan result" testID="plan-result" />
      </Card>
      <Card>
        <Text variant="title" accessibilityRole="header">
          Inputs
        </Text>
        <DataTable columns={COLUMNS} rows={inputs} rowKey={(r) => r.label} caption="Plan inputs" testID="plan-inputs-table" />
      </Card>
      <Text variant="small" tone="muted">
        Advisory. The setpoint changes only through the site’s change control, made by qualified staff; Yieldpoint never writes to a control system.
      </Text>
    </>
  );
}

const styles = StyleSheet.create({ actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm } });
