import { scaleLinear } from 'd3-scale';
import { area, line } from 'd3-shape';
import { plotBox, type Box, type Tick } from './axes';

export type Point = { x: number; y: number };
export type LineSeries = { id: string; points: readonly Point[] };
export type BandSeries = { id: string; points: readonly { x: number; lo: number; hi: number }[] };
export type MarkerSpec = { id: string; x: number; y: number; label: string };

export type LineChartInput = {
  width: number;
  height: number;
  series: readonly LineSeries[];
  bands?: readonly BandSeries[];
  markers?: readonly MarkerSpec[];
  /** Start the y axis at zero (amounts); otherwise fit the data. */
  yFromZero?: boolean;
  xTicks?: number;
  yTicks?: number;
  formatX?: (v: number) => string;
  formatY?: (v: number) => string;
};

export type LineChartGeometry = {
  box: Box;
  lines: { id: string; d: string }[];
  bands: { id: string; d: string }[];
  markers: { id: string; cx: number; cy: number; label: string }[];
  xTicks: Tick[];
  yTicks: Tick[];
};

const finite = (v: number) => Number.isFinite(v);

/** Scales, ticks and SVG paths of a line chart; pure so it can be tested without rendering. Non-finite y breaks a line. */
export function lineChartGeometry(input: LineChartInput): LineChartGeometry {
  const box = plotBox(input.width, input.height);
  const xs: number[] = [];
  const ys: number[] = [];
  for (const s of input.series)
    for (const p of s.points)
      if (finite(p.x) && finite(p.y)) {
        xs.push(p.x);
        ys.push(p.y);
      }
  for (const b of input.bands ?? [])
    for (const p of b.points)
      if (finite(p.lo) && finite(p.hi)) {
        xs.push(p.x);
        ys.push(p.lo, p.hi);
      }
  for (const mk of input.markers ?? [])
    if (finite(mk.x) && finite(mk.y)) {
      xs.push(mk.x);
      ys.push(mk.y);
    }
  let [x0, x1] = xs.length ? [Math.min(...xs), Math.max(...xs)] : [0, 1];
  let [y0, y1] = ys.length ? [Math.min(...ys), Math.max(...ys)] : [0, 1];
  if (input.yFromZero) y0 = Math.min(0, y0);
  if (x0 === x1) {
    x0 -= 1;
    x1 += 1;
  }
  if (y0 === y1) {
    y0 -= Math.abs(y0) * 0.1 || 1;
    y1 += Math.abs(y1) * 0.1 || 1;
  }
  const x = scaleLinear().domain([x0, x1]).range([box.left, box.right]);
  // SVG y grows downwards: the range is inverted so larger values sit higher.
  const y = scaleLinear()
    .domain([y0, y1])
    .range([box.bottom, box.top])
    .nice(input.yTicks ?? 5);
  const fx = input.formatX ?? ((v: number) => String(v));
  const fy = input.formatY ?? ((v: number) => String(v));
  const path = line<Point>()
    .defined((p) => finite(p.x) && finite(p.y))
    .x((p) => x(p.x))
    .y((p) => y(p.y));
  const band = area<{ x: number; lo: number; hi: number }>()
    .defined((p) => finite(p.lo) && finite(p.hi))
    .x((p) => x(p.x))
    .y0((p) => y(p.lo))
    .y1((p) => y(p.hi));
  return {
    box,
    lines: input.series.map((s) => ({ id: s.id, d: path([...s.points]) ?? '' })),
    bands: (input.bands ?? []).map((b) => ({ id: b.id, d: band([...b.points]) ?? '' })),
    markers: (input.markers ?? [])
      .filter((mk) => finite(mk.x) && finite(mk.y))
      // Marker labels go in the legend: neighbouring markers (current and best setpoint) sit too close to label in place.
      .map((mk) => ({ id: mk.id, cx: x(mk.x), cy: y(mk.y), label: mk.label })),
    xTicks: x.ticks(input.xTicks ?? 5).map((v) => ({ value: v, pos: x(v), label: fx(v) })),
    yTicks: y.ticks(input.yTicks ?? 5).map((v) => ({ value: v, pos: y(v), label: fy(v) })),
  };
}
