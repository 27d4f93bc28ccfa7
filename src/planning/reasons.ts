import type { PlanOutputs } from '../contracts/plans';
import type { PlanSeries } from './series';
import { timeToActivity } from './series';

const c1 = (x: number) => `${x.toFixed(1)} °C`;
const pct = (x: number, d = 0) => `${(x * 100).toFixed(d)} %`;
const h0 = (x: number) => `${Math.round(x)}`;
const h1 = (x: number) => x.toFixed(1);

/** The recommendation in plain sentences, each with its key number; also the text equivalent of the charts. */
export function planReasons(
  out: Omit<PlanOutputs, 'uncertainty'>,
  series: Pick<PlanSeries, 'current' | 'bestBatch'>,
  batchH: number,
  turnaroundH: number,
): string[] {
  const reasons: string[] = [];
  const cur = out.current;
  const lost = 1 - cur.activityLeft;
  const half = timeToActivity(series.current, 0.5);
  const diff = out.setpointC - cur.setpointC;
  const lossText =
    half !== null
      ? `has lost half its activity by hour ${h0(half)} and ${pct(lost)} by the end (hour ${h0(batchH)})`
      : `loses ${pct(lost)} of its activity by the end (hour ${h0(batchH)})`;
  const early = out.earlyFinish;
  if (early) {
    const at = out.strategy === 'staged' ? 'with the recommended profile' : `at ${c1(out.setpointC)}`;
    const curText =
      early.currentCompleteAtH === null || Math.abs(diff) < 0.1 ? '' : ` (hour ${h1(early.currentCompleteAtH)} at the current ${c1(out.current.setpointC)})`;
    reasons.push(
      `The substrate is fully converted by hour ${h1(early.completeAtH)} ${at}${curText}; the remaining ${h1(batchH - early.completeAtH)} h of the ${h0(batchH)} h batch add no product. A batch ended at hour ${h1(early.completeAtH)} would earn ${early.shorterProfitPerH.toFixed(0)} per reactor hour against ${early.fullProfitPerH.toFixed(0)} for the full batch (${h0(turnaroundH)} h turnaround included).`,
    );
  }
  if (early && Math.abs(diff) < 0.1) {
    reasons.push(`No setpoint change: at ${c1(cur.setpointC)} the lot ${lossText}, and a warmer or cooler batch cannot make more than all the substrate.`);
  } else if (Math.abs(diff) < 0.1) {
    reasons.push(`The current setpoint of ${c1(cur.setpointC)} is already within 0.1 °C of the best one for a ${h0(batchH)} h batch; the lot ${lossText}.`);
  } else {
    const isoGain = out.strategy === 'isothermal' ? out.gainOverCurrent : null;
    const more =
      isoGain === null
        ? ''
        : isoGain >= 0
          ? `; ${c1(out.setpointC)} makes ${pct(isoGain, 1)} more product`
          : `; ${c1(out.setpointC)} makes ${pct(-isoGain, 1)} less product`;
    reasons.push(`At ${c1(cur.setpointC)} (current) the lot ${lossText}${more}.`);
    reasons.push(
      diff < 0
        ? `${c1(out.setpointC)} is cooler: the enzyme works more slowly but lasts the whole batch, ending with ${pct(out.activityLeft)} of its activity.`
        : `${c1(out.setpointC)} is warmer: the lot is stable enough to work faster for ${h0(batchH)} h and still ends with ${pct(out.activityLeft)} of its activity.`,
    );
  }
  if (out.atBound === 'upper')
    reasons.push(`The best setpoint sits at the vessel's maximum of ${c1(out.boundsC[1])}; a hotter vessel would do better still, but the limit holds.`);
  if (out.atBound === 'lower') reasons.push(`The best setpoint sits at the vessel's minimum of ${c1(out.boundsC[0])}; the limit holds.`);
  if (out.strategy === 'staged' && out.stages) {
    reasons.push(
      `A rising profile of ${out.stages.length} stages (${out.stages.map((s) => s.c.toFixed(1)).join(' → ')} °C) makes ${pct(out.stagedGain, 1)} more than holding ${c1(out.setpointC)}, ramps included.`,
    );
  } else if (out.stagedGain > 0.002) {
    reasons.push(`A rising staged profile would make ${pct(out.stagedGain, 1)} more than holding ${c1(out.setpointC)}.`);
  }
  reasons.push(
    `Profit per reactor hour peaks at a ${series.bestBatch.batchH.toFixed(1)} h batch (${h0(turnaroundH)} h turnaround) at ${c1(series.bestBatch.setpointC)}.`,
  );
  if (out.cautions.crossesBoiling)
    reasons.push(
      `Pressure caution: the plan reaches ${c1(out.cautions.maxC)}, above 100 °C; a water-based batch is then under about ${Math.round(out.cautions.saturationKPa)} kPa absolute.`,
    );
  if (out.cautions.belowHygienicMin)
    reasons.push(`Hygiene caution: the plan holds the batch below the vessel's hygienic minimum of ${c1(out.cautions.hygienicMinC)}.`);
  return reasons;
}
