import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import type { PlanInputs } from '../../contracts/plans';
import type { RecipeDetail } from '../../contracts/recipes';
import { fmt } from '../../format';
import { evaluatePlan, setpointCurve } from '../../planning';
import { space } from '../../theme';
import { LineChart, type ChartTone } from '../charts/line-chart';
import { Button, Card, DataTable, Text, type Column } from '../ui';
import { contextFor } from './use-planner';
import { useSiteFormat } from '../../hooks/use-site-format';

export const MAX_SCENARIOS = 4;
const TONES: ChartTone[] = ['primary', 'accent', 'third', 'fourth'];

export type Scenario = { id: string; inputs: PlanInputs };

type Row = {
  id: string;
  lot: string;
  batchH: number;
  dose: number;
  price: number;
  enzymePrice: number;
  heating: number;
  setpointC: number;
  product: number;
  activity: number;
  profit: number;
};

const columnsIn = (cur: string): Column<Row>[] => [
  { key: 'id', label: '#', value: (r) => r.id, flex: 0.4 },
  { key: 'lot', label: 'Lot', value: (r) => r.lot, flex: 1.7 },
  { key: 'batch', label: 'Batch h', value: (r) => fmt(r.batchH, 0), isNumeric: true },
  { key: 'dose', label: 'Dose g/L', value: (r) => fmt(r.dose, 2), isNumeric: true },
  { key: 'price', label: `Product ${cur}/kg`, value: (r) => fmt(r.price, 2), isNumeric: true },
  { key: 'enzymePrice', label: `Enzyme ${cur}/kg`, value: (r) => fmt(r.enzymePrice, 2), isNumeric: true },
  { key: 'heating', label: `Heating ${cur}/°C·h`, value: (r) => fmt(r.heating, 2), isNumeric: true },
  { key: 'setpoint', label: 'Best °C', value: (r) => fmt(r.setpointC), isNumeric: true },
  { key: 'product', label: 'Product g/L', value: (r) => fmt(r.product, 0), isNumeric: true, flex: 1.1 },
  { key: 'activity', label: 'Activity left', value: (r) => `${fmt(r.activity * 100, 0)} %`, isNumeric: true },
  { key: 'profit', label: `Profit ${cur}/h`, value: (r) => fmt(r.profit, 0), isNumeric: true },
];

/** Up to four saved snapshots of the inputs, side by side in a table and as overlaid curves. */
export function ComparePanel({
  detail,
  scenarios,
  canAdd,
  onAdd,
  onRemove,
}: {
  detail: RecipeDetail;
  scenarios: Scenario[];
  canAdd: boolean;
  onAdd: () => void;
  onRemove: (id: string) => void;
}) {
  const site = useSiteFormat();
  const evaluated = useMemo(
    () =>
      scenarios.flatMap((s) => {
        const ctx = contextFor(detail, s.inputs.lotId);
        if (!ctx) return [];
        const ev = evaluatePlan(ctx, s.inputs);
        return [{ s, ev, curve: setpointCurve(ev, s.inputs.batchH, 41) }];
      }),
    [detail, scenarios],
  );
  const lotCode = (id: number) => detail.lots.find((l) => l.id === id)?.lotCode ?? '?';
  const rows: Row[] = evaluated.map(({ s, ev }) => ({
    id: s.id,
    lot: lotCode(s.inputs.lotId),
    batchH: s.inputs.batchH,
    dose: s.inputs.doseGPerL,
    price: s.inputs.productPricePerKg,
    enzymePrice: s.inputs.enzymePricePerKg,
    heating: s.inputs.heatingCostPerDegCHour,
    setpointC: ev.outputs.setpointC,
    product: ev.outputs.predictedProductGPerL,
    activity: ev.outputs.activityLeft,
    profit: ev.outputs.profitPerH,
  }));
  const best = rows.reduce<Row | null>((b, r) => (!b || r.profit > b.profit ? r : b), null);
  return (
    <Card testID="compare">
      <Text variant="title" accessibilityRole="header">
        Compare scenarios
      </Text>
      <Text variant="small" tone="muted">
        Keep the current inputs as a scenario, change lot, batch length, dose or prices, and keep another (up to {MAX_SCENARIOS}).
      </Text>
      <Button
        label={`Keep these inputs as scenario ${String.fromCharCode(65 + scenarios.length)}`}
        variant="secondary"
        disabled={!canAdd}
        onPress={onAdd}
        testID="compare-add"
      />
      {rows.length ? (
        <>
          <DataTable columns={columnsIn(site.currency)} rows={rows} rowKey={(r) => r.id} caption="Scenarios compared" testID="compare-table" />
          <LineChart
            title="Product vs setpoint, by scenario"
            summary={`${rows.map((r) => `${r.id}: best ${fmt(r.setpointC)} °C, ${fmt(r.product, 0)} g/L`).join('; ')}.${best ? ` Most profit per hour: scenario ${best.id}.` : ''}`}
            testID="chart-compare"
            xLabel="setpoint, °C"
            yLabel="product, g/L"
            series={evaluated.map(({ s, curve }, i) => ({ id: s.id, label: `Scenario ${s.id}`, tone: TONES[i % TONES.length]!, points: curve }))}
          />
          <View style={styles.row}>
            {rows.map((r) => (
              <Button key={r.id} label={`Remove ${r.id}`} variant="ghost" onPress={() => onRemove(r.id)} />
            ))}
          </View>
        </>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({ row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm } });
