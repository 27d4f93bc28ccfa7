import { scaleLinear } from 'd3-scale';
import { plotBox, tickLabel, ticksOf, type Box, type Tick } from './axes';

/** `group` picks the series (0 when there is one): the same batch may appear once per forecast kind. */
export type AccuracyPoint = { id: number; forecastGPerL: number; measuredGPerL: number; group?: number };
export type ForecastAccuracyGeometry = {
  box: Box;
  xTicks: Tick[];
  yTicks: Tick[];
  dots: { x: number; y: number; p: AccuracyPoint }[];
  /** The line measured = forecast, across the plotted range. */
  diagonal: { x1: number; y1: number; x2: number; y2: number };
  /** Mean of measured / forecast - 1 over the points; null without points. */
  meanBias: number | null;
};

/** Measured product (y) against the forecast at closing (x) on the same scale, with the line of perfect forecasts. */
export function forecastAccuracyGeometry(points: readonly AccuracyPoint[], width: number, height: number): ForecastAccuracyGeometry {
  const box = plotBox(width, height);
  const values = points.flatMap((p) => [p.forecastGPerL, p.measuredGPerL]);
  let lo = values.length ? Math.min(...values) : 0;
  let hi = values.length ? Math.max(...values) : 1;
  const pad = Math.max(1, 0.08 * (hi - lo));
  lo = Math.max(0, lo - pad);
  hi += pad;
  const x = scaleLinear().domain([lo, hi]).nice().range([box.left, box.right]);
  const [d0, d1] = x.domain() as [number, number];
  const y = scaleLinear().domain([d0, d1]).range([box.bottom, box.top]);
  return {
    box,
    xTicks: ticksOf(x, 5, tickLabel),
    yTicks: ticksOf(y, 5, tickLabel),
    dots: points.map((p) => ({ x: x(p.forecastGPerL), y: y(p.measuredGPerL), p })),
    diagonal: { x1: x(d0), y1: y(d0), x2: x(d1), y2: y(d1) },
    meanBias: points.length ? points.reduce((s, p) => s + p.measuredGPerL / p.forecastGPerL - 1, 0) / points.length : null,
  };
}
