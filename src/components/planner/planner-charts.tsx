import { profitCurve } from '../../model/economics';
import { simulate } from '../../model/batch';
import type { UncertaintyResult } from '../../model/uncertainty';
import type { PlanInputs } from '../../contracts/plans';
import { fmt } from '../../format';
import type { PlanEvaluation, PlanSeries } from '../../planning';
import { LineChart } from '../charts/line-chart';
import { Card } from '../ui';
import { useSiteFormat } from '../../hooks/use-site-format';

type Props = { ev: PlanEvaluation; series: PlanSeries; inputs: PlanInputs };

const degrees = (v: number) => `${v}`;
const pct = (v: number) => `${Math.round(v * 100)}`;

/** Product at the end of the batch against the setpoint held, current and recommended marked, with the P10–P90 band once run. */
export function SetpointChart({ ev, series, inputs, uncertainty }: Props & { uncertainty: UncertaintyResult | null }) {
  const o = ev.outputs;
  const held = (c: number) => simulate(ev.enzyme, ev.substrate, inputs.batchH, { setpointC: c }).productGPerL;
  const robust = uncertainty?.robust;
  const band = uncertainty ? uncertainty.candidates.map((c) => ({ x: c.c, lo: c.p10, hi: c.p90 })) : null;
  const summary =
    `Held for ${fmt(inputs.batchH, 0)} h, the best setpoint is ${fmt(o.setpointC)} °C (about ${fmt(held(o.setpointC), 0)} g/L); ` +
    `the current ${fmt(o.current.setpointC)} °C gives about ${fmt(held(o.current.setpointC), 0)} g/L.` +
    (robust && uncertainty
      ? ` With ${uncertainty.draws} draws, P10–P90 is shaded; the setpoint with the best P10 is ${fmt(robust.setpointC)} °C (P10 ${fmt(robust.p10, 0)} g/L).`
      : '');
  return (
    <Card>
      <LineChart
        title="Product vs setpoint"
        summary={summary}
        testID="chart-setpoint"
        xLabel="setpoint, °C"
        yLabel="product, g/L"
        formatX={degrees}
        series={[{ id: 'curve', label: 'Product at the end of the batch, setpoint held', tone: 'primary', points: series.setpointCurve }]}
        bands={band ? [{ id: 'band', label: 'P10–P90', tone: 'primary', points: band }] : []}
        markers={[
          { id: 'current', x: o.current.setpointC, y: held(o.current.setpointC), label: `Current ${fmt(o.current.setpointC)} °C`, tone: 'accent' },
          { id: 'best', x: o.setpointC, y: held(o.setpointC), label: `Best ${fmt(o.setpointC)} °C`, tone: 'primary' },
          ...(robust
            ? [{ id: 'robust', x: robust.setpointC, y: robust.p10, label: `Robust (best P10) ${fmt(robust.setpointC)} °C`, tone: 'third' as const }]
            : []),
        ]}
      />
    </Card>
  );
}

/** Product made and activity left over the batch, at the current and at the recommended setpoint (ramps included). */
export function TimeCharts({ ev, series, inputs }: Props) {
  const o = ev.outputs;
  const cur = series.current;
  const rec = series.recommended;
  const last = <T,>(a: T[]) => a[a.length - 1]!;
  return (
    <Card>
      <LineChart
        title="Product over the batch"
        summary={`By hour ${fmt(inputs.batchH, 0)}: ${fmt(last(rec).productGPerL, 0)} g/L at ${fmt(o.setpointC)} °C against ${fmt(last(cur).productGPerL, 0)} g/L at ${fmt(o.current.setpointC)} °C, heat-up included.`}
        testID="chart-product-time"
        xLabel="hours"
        yLabel="product, g/L"
        yFromZero
        series={[
          { id: 'rec', label: `Best, ${fmt(o.setpointC)} °C`, tone: 'primary', points: rec.map((p) => ({ x: p.h, y: p.productGPerL })) },
          {
            id: 'cur',
            label: `Current, ${fmt(o.current.setpointC)} °C`,
            tone: 'accent',
            dashed: true,
            points: cur.map((p) => ({ x: p.h, y: p.productGPerL })),
          },
        ]}
      />
      <LineChart
        title="Enzyme activity left"
        summary={`At the end the lot keeps ${pct(last(rec).activity)} % of its activity at ${fmt(o.setpointC)} °C and ${pct(last(cur).activity)} % at ${fmt(o.current.setpointC)} °C.`}
        testID="chart-activity-time"
        xLabel="hours"
        yLabel="activity left, %"
        yFromZero
        formatY={(v) => `${v}`}
        series={[
          { id: 'rec', label: `Best, ${fmt(o.setpointC)} °C`, tone: 'primary', points: rec.map((p) => ({ x: p.h, y: p.activity * 100 })) },
          {
            id: 'cur',
            label: `Current, ${fmt(o.current.setpointC)} °C`,
            tone: 'accent',
            dashed: true,
            points: cur.map((p) => ({ x: p.h, y: p.activity * 100 })),
          },
        ]}
      />
    </Card>
  );
}

/** The best staged profile over time, as the vessel would run it, against holding the best setpoint. */
export function ProfileChart({ ev, inputs }: Props) {
  const o = ev.outputs;
  const staged = ev.staged.log.map((r) => ({ x: r.h, y: r.c }));
  const held = ev.isothermal.log.map((r) => ({ x: r.h, y: r.c }));
  const max = [
    { x: 0, y: ev.boundsC[1] },
    { x: inputs.batchH, y: ev.boundsC[1] },
  ];
  const stages = ev.staged.stages.map((s) => fmt(s.c)).join(' → ');
  return (
    <Card>
      <LineChart
        title={`Best ${inputs.stages}-stage profile`}
        summary={`Stages of ${fmt(inputs.batchH / inputs.stages)} h at ${stages} °C, steps at most ${fmt(inputs.maxStepC)} °C, ramps at the vessel's rates: ${o.stagedGain >= 0 ? `${fmt(o.stagedGain * 100)} % more` : `${fmt(-o.stagedGain * 100)} % less`} product than holding ${fmt(o.setpointC)} °C (${fmt(ev.staged.sim.productGPerL, 0)} against ${fmt(ev.isothermal.sim.productGPerL, 0)} g/L).`}
        testID="chart-profile"
        xLabel="hours"
        yLabel="temperature, °C"
        series={[
          { id: 'staged', label: 'Rising stages', tone: 'primary', points: staged },
          { id: 'held', label: `One setpoint held, ${fmt(o.setpointC)} °C (dashed)`, tone: 'accent', dashed: true, points: held },
          { id: 'max', label: `Vessel maximum, ${fmt(ev.boundsC[1])} °C (dotted, never planned past)`, tone: 'limit', dotted: true, points: max },
        ]}
      />
    </Card>
  );
}

/** Profit per reactor hour against batch length, each length at its own best setpoint. */
export function ProfitChart({ ev, series, inputs }: Props) {
  const b = series.bestBatch;
  const chosen = profitCurve(ev.enzyme, ev.substrate, ev.boundsC, [inputs.batchH], ev.econ)[0]!;
  const site = useSiteFormat();
  return (
    <Card>
      <LineChart
        title={`Profit per reactor hour (${site.currency}/h) vs batch length`}
        summary={`With ${fmt(inputs.turnaroundH, 0)} h turnaround, profit per reactor hour peaks at ${site.money(b.profitPerH, 0)} for a ${fmt(b.batchH)} h batch at ${fmt(b.setpointC)} °C; a ${fmt(inputs.batchH, 0)} h batch makes about ${site.money(chosen.profitPerH, 0)} per hour.`}
        testID="chart-profit"
        xLabel="batch length, h"
        yLabel={`profit, ${site.currency}/h`}
        series={[
          {
            id: 'profit',
            label: 'Profit per hour, each at its best setpoint',
            tone: 'primary',
            points: series.profit.map((p) => ({ x: p.batchH, y: p.profitPerH })),
          },
        ]}
        markers={[
          { id: 'best', x: b.batchH, y: b.profitPerH, label: `Best ${fmt(b.batchH, 0)} h`, tone: 'primary' },
          { id: 'chosen', x: chosen.batchH, y: chosen.profitPerH, label: `Chosen ${fmt(inputs.batchH, 0)} h`, tone: 'accent' },
        ]}
      />
    </Card>
  );
}
