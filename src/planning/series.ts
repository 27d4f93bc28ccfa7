import { optimizeEconomics, profitCurve } from '../model/economics';
import { simulate, trajectory } from '../model/batch';
import type { TrajectoryPoint } from '../model/types';
import type { PlanInputs } from '../contracts/plans';
import type { PlanEvaluation } from './evaluate';

export type XY = { x: number; y: number };

/** The numbers behind the planner's charts. */
export type PlanSeries = {
  /** Product (g/L) at the end of the batch against a setpoint held from the start (degC). */
  setpointCurve: XY[];
  current: TrajectoryPoint[];
  recommended: TrajectoryPoint[];
  staged: TrajectoryPoint[];
  /** Profit per reactor hour against batch length, each length at its own best setpoint. */
  profit: { batchH: number; setpointC: number; profitPerH: number }[];
  bestBatch: { batchH: number; setpointC: number; profitPerH: number };
};

/** Product at each setpoint across the range, held for the whole batch (closed form, no ramps). */
export function setpointCurve(ev: PlanEvaluation, batchH: number, points = 61): XY[] {
  const [lo, hi] = ev.boundsC;
  return Array.from({ length: points }, (_, i) => {
    const c = i === points - 1 ? hi : lo + ((hi - lo) * i) / (points - 1);
    return { x: c, y: simulate(ev.enzyme, ev.substrate, batchH, { setpointC: c }).productGPerL };
  });
}

/** Batch lengths for the profit chart: a quarter to three times the chosen one, evenly spaced on a log scale. */
export function batchLengths(batchH: number, n = 25): number[] {
  const lo = Math.log(Math.max(0.5, batchH / 4));
  const hi = Math.log(batchH * 3);
  return Array.from({ length: n }, (_, i) => Math.exp(lo + ((hi - lo) * i) / (n - 1)));
}

export function planSeries(ev: PlanEvaluation, inputs: PlanInputs): PlanSeries {
  const { batchH } = inputs;
  const lengths = batchLengths(batchH);
  const best = optimizeEconomics(ev.enzyme, ev.substrate, ev.boundsC, [lengths[0], lengths[lengths.length - 1]], ev.econ);
  return {
    setpointCurve: setpointCurve(ev, batchH),
    current: trajectory(ev.enzyme, ev.substrate, batchH, { log: ev.current.log }, 49),
    recommended: trajectory(ev.enzyme, ev.substrate, batchH, { log: ev.isothermal.log }, 49),
    staged: trajectory(ev.enzyme, ev.substrate, batchH, { log: ev.staged.log }, 49),
    profit: profitCurve(ev.enzyme, ev.substrate, ev.boundsC, lengths, ev.econ).map((p) => ({
      batchH: p.batchH,
      setpointC: p.setpointC,
      profitPerH: p.profitPerH,
    })),
    bestBatch: { batchH: best.batchH, setpointC: best.setpointC, profitPerH: best.profitPerH },
  };
}

/** First time (h) the activity falls to `level` or below, by linear interpolation; null if it never does. */
export function timeToActivity(points: readonly TrajectoryPoint[], level: number): number | null {
  for (let i = 1; i < points.length; i++) {
    const a = points[i - 1];
    const b = points[i];
    if (b.activity <= level) {
      if (a.activity === b.activity) return b.h;
      return a.h + ((a.activity - level) / (a.activity - b.activity)) * (b.h - a.h);
    }
  }
  return null;
}
