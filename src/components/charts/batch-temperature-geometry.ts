import { scaleLinear } from 'd3-scale';
import { area, line } from 'd3-shape';
import { temperatureAt } from '../../model/batch';
import { plotBox, tickLabel, ticksOf, type Box, type Tick } from './axes';

export type TempPoint = { h: number; c: number };

export type BatchTemperatureInput = {
  /** The planned temperature program (ramps included), h and degC. */
  plan: readonly TempPoint[];
  batchH: number;
  toleranceC: number;
  /** Logged readings sorted by h; queued (not yet sent) ones are drawn hollow, control-system ones apart. */
  readings: readonly (TempPoint & { isQueued?: boolean; isControl?: boolean })[];
  /** Spans the control-system link could not fill (no history on the server), h. */
  gaps?: readonly { fromH: number; toH: number }[];
  /** Longest time between readings before the logged line breaks, h. */
  gapLimitH: number;
  vesselMaxC: number;
  nowH: number | null;
};

export type BatchTemperatureGeometry = {
  box: Box;
  xTicks: Tick[];
  yTicks: Tick[];
  planPath: string;
  bandPath: string;
  /** One path per run of readings typed or imported; a gap longer than the limit breaks the line. */
  loggedPaths: string[];
  /** The same for readings from the control system, drawn apart. */
  controlPaths: string[];
  dots: { x: number; y: number; isOutside: boolean; isQueued: boolean; isControl: boolean }[];
  /** x spans of the link's unfilled gaps. */
  gapSpans: { x0: number; x1: number }[];
  /** y of the vessel maximum when it lies inside the plotted range, else null. */
  vesselMaxY: number | null;
  nowX: number | null;
};

// Beyond this many readings the dots would merge into a band: the line alone carries them.
const MAX_DOTS = 400;

/** Keeps the lowest and highest reading of each pixel column (in time order), so a long record draws the same with far fewer points. */
export function thin(run: readonly TempPoint[], column: (p: TempPoint) => number): TempPoint[] {
  if (run.length < 1000) return [...run];
  const out: TempPoint[] = [];
  let col = NaN;
  let lo: TempPoint | null = null;
  let hi: TempPoint | null = null;
  const flush = () => {
    if (!lo || !hi) return;
    if (lo === hi) out.push(lo);
    else out.push(...(lo.h <= hi.h ? [lo, hi] : [hi, lo]));
  };
  for (const p of run) {
    const c = column(p);
    if (c !== col) {
      flush();
      col = c;
      lo = hi = p;
    } else {
      if (p.c < lo!.c) lo = p;
      if (p.c > hi!.c) hi = p;
    }
  }
  flush();
  return out;
}

/**
 * Logged temperature against the plan and its tolerance band over batch time. Pure: sizes in, SVG coordinates
 * and paths out; y grows downwards in SVG, so the range is inverted.
 */
export function batchTemperatureGeometry(input: BatchTemperatureInput, width: number, height: number): BatchTemperatureGeometry {
  const box = plotBox(width, height);
  const { plan, batchH, toleranceC, readings } = input;
  // Sample the plan at its corners and often enough to draw ramps straight.
  const hs = [...new Set([...plan.map((p) => p.h).filter((h) => h >= 0 && h <= batchH), 0, batchH])].sort((a, b) => a - b);
  const planPts = hs.map((h) => ({ h, c: temperatureAt({ log: plan }, h) }));
  const cs = [...planPts.map((p) => p.c - toleranceC), ...planPts.map((p) => p.c + toleranceC), ...readings.map((r) => r.c)];
  let lo = Math.min(...cs);
  let hi = Math.max(...cs);
  // Show the vessel maximum when it is within reach of the data, so its distance reads at a glance.
  const showMax = input.vesselMaxC - hi < Math.max(10, 0.5 * (hi - lo));
  if (showMax) hi = Math.max(hi, input.vesselMaxC);
  if (hi - lo < 4) [lo, hi] = [lo - 2, hi + 2];
  const maxH = Math.max(batchH, ...readings.map((r) => r.h));
  const x = scaleLinear().domain([0, maxH]).range([box.left, box.right]);
  const y = scaleLinear().domain([lo, hi]).nice().range([box.bottom, box.top]);
  const path = line<TempPoint>()
    .x((p) => x(p.h))
    .y((p) => y(p.c));
  const band = area<TempPoint>()
    .x((p) => x(p.h))
    .y0((p) => y(p.c - toleranceC))
    .y1((p) => y(p.c + toleranceC));
  const runsOf = (rs: readonly TempPoint[]) => {
    const runs: TempPoint[][] = [];
    for (const r of rs) {
      const last = runs.at(-1);
      if (last && r.h - last[last.length - 1].h <= input.gapLimitH + 1e-9) last.push(r);
      else runs.push([r]);
    }
    return runs.filter((r) => r.length > 1).map((r) => path(thin(r, (p) => Math.floor(x(p.h)))) ?? '');
  };
  const dots =
    readings.length <= MAX_DOTS
      ? readings.map((r) => ({
          x: x(r.h),
          y: y(r.c),
          isOutside: Math.abs(r.c - temperatureAt({ log: plan }, r.h)) > toleranceC + 1e-9,
          isQueued: !!r.isQueued,
          isControl: !!r.isControl,
        }))
      : [];
  return {
    box,
    xTicks: ticksOf(x, 6, tickLabel),
    yTicks: ticksOf(y, 5, tickLabel),
    planPath: path(planPts) ?? '',
    bandPath: band(planPts) ?? '',
    loggedPaths: runsOf(readings.filter((r) => !r.isControl)),
    controlPaths: runsOf(readings.filter((r) => r.isControl)),
    dots,
    gapSpans: (input.gaps ?? []).map((g) => ({ x0: x(Math.max(0, g.fromH)), x1: x(Math.min(maxH, g.toH)) })).filter((g) => g.x1 > g.x0),
    vesselMaxY: showMax ? y(input.vesselMaxC) : null,
    nowX: input.nowH !== null && input.nowH >= 0 && input.nowH <= maxH ? x(input.nowH) : null,
  };
}
