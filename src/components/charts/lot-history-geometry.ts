import { scaleLinear, scaleUtc } from 'd3-scale';
import { plotBox, tickLabel, ticksOf, type Box, type Tick } from './axes';

export type HistoryPoint = {
  lotCode: string;
  receivedOn: string;
  basis: 'assay' | 'certificate' | 'none';
  halfLifeH: number | null;
  lowerH: number | null;
  upperH: number | null;
};
export type HistoryGeometry = {
  box: Box;
  xTicks: Tick[];
  yTicks: Tick[];
  marks: { x: number; y: number; yLow: number | null; yHigh: number | null; p: HistoryPoint }[];
  /** The specification's minimum half-life as a horizontal line. */
  specY: number;
};

const DAY_MS = 86_400_000;
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const monthLabel = (ms: number) => {
  const d = new Date(ms);
  return `${MONTHS[d.getUTCMonth()]} ${String(d.getUTCFullYear()).slice(2)}`;
};

/**
 * Half-life at the specification temperature across an enzyme's lots by date received, with the 95 % interval as
 * a bar where an assay gave one, and the specification's minimum as a line. Lots with no figure are left out.
 */
export function lotHistoryGeometry(points: readonly HistoryPoint[], specMinHalfLifeH: number, width: number, height: number): HistoryGeometry {
  const box = plotBox(width, height);
  const shown = points.filter((p) => p.halfLifeH !== null);
  const times = shown.map((p) => Date.parse(`${p.receivedOn}T00:00:00Z`));
  const lo = times.length ? Math.min(...times) : Date.UTC(2026, 0, 1);
  const hi = times.length ? Math.max(...times) : lo;
  // A fortnight either side keeps the first and last marks off the axes.
  const x = scaleUtc()
    .domain([lo - 14 * DAY_MS, hi + 14 * DAY_MS])
    .range([box.left + 8, box.right - 8]);
  const values = shown.flatMap((p) => [p.halfLifeH!, p.lowerH ?? p.halfLifeH!, p.upperH ?? p.halfLifeH!]);
  const y = scaleLinear()
    .domain([0, Math.max(specMinHalfLifeH, ...values) * 1.1])
    .nice()
    .range([box.bottom, box.top]);
  const xTicks = x.ticks(4).map((d) => ({ value: d.getTime(), pos: x(d), label: monthLabel(d.getTime()) }));
  return {
    box,
    xTicks,
    yTicks: ticksOf(y, 5, tickLabel),
    marks: shown.map((p, i) => ({
      x: x(times[i]!),
      y: y(p.halfLifeH!),
      yLow: p.lowerH === null ? null : y(p.lowerH),
      yHigh: p.upperH === null ? null : y(p.upperH),
      p,
    })),
    specY: y(specMinHalfLifeH),
  };
}
