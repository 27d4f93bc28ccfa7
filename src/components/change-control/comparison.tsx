import type { SetpointSide } from '../../contracts/change-requests';
import { fmt } from '../../format';
import { DataTable, type Column } from '../ui';
import { useSiteFormat } from '../../hooks/use-site-format';

type Row = { label: string; current: string; proposed: string };

const COLUMNS: Column<Row>[] = [
  { key: 'label', label: 'Item', value: (r) => r.label, flex: 1.2 },
  { key: 'current', label: 'Current', value: (r) => r.current, flex: 1.4 },
  { key: 'proposed', label: 'Proposed', value: (r) => r.proposed, flex: 1.4 },
];

const SOURCE: Record<SetpointSide['source'], string> = {
  'released-plan': 'Released plan',
  'recipe-setpoint': 'Recipe setpoint (no released plan)',
  'proposed-plan': 'Proposed plan',
};

const orDash = (v: number | null, f: (x: number) => string) => (v === null ? '–' : f(v));

function setpoint(s: SetpointSide): string {
  if (s.stages) return s.stages.map((st) => `${fmt(st.hours)} h at ${fmt(st.c)} °C`).join(', ');
  return `${fmt(s.setpointC)} °C held`;
}

/** Current and proposed setpoints with their predicted figures, one row per figure. */
export function Comparison({ current, proposed }: { current: SetpointSide; proposed: SetpointSide }) {
  const site = useSiteFormat();
  const row = (label: string, f: (s: SetpointSide) => string): Row => ({ label, current: f(current), proposed: f(proposed) });
  const rows: Row[] = [
    row('Basis', (s) => `${SOURCE[s.source]}${s.planId ? ` #${s.planId}` : ''}`),
    row(proposed.stages || current.stages ? 'Setpoint or profile' : 'Setpoint', setpoint),
    row('Predicted product', (s) => orDash(s.predictedProductGPerL, (x) => `${fmt(x)} g/L`)),
    row('P10 / P50 / P90', (s) =>
      s.p10GPerL === null || s.p50GPerL === null || s.p90GPerL === null ? 'Not run' : `${fmt(s.p10GPerL)} / ${fmt(s.p50GPerL)} / ${fmt(s.p90GPerL)} g/L`,
    ),
    row('Activity left at the end', (s) => orDash(s.activityLeft, (x) => `${fmt(x * 100, 0)} %`)),
    row('Profit per reactor hour', (s) => orDash(s.profitPerH, (x) => site.money(x, 1))),
    row('Constraints met', (s) => (s.constraintsMet === null ? '–' : s.constraintsMet ? 'Yes' : 'No')),
  ];
  return <DataTable columns={COLUMNS} rows={rows} rowKey={(r) => r.label} caption="Current and proposed setpoint" testID="comparison" />;
}
