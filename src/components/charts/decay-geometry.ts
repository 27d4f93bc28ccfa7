import { scaleLinear } from 'd3-scale';
import { line } from 'd3-shape';
import { arrheniusFactor } from '../../model/kinetics';
import { plotBox, tickLabel, ticksOf, type Box, type Tick } from './axes';

export type DecayPoint = { tempC: number; timeH: number; residual: number };
export type DecayFit = { tRefC: number; kdRefPerH: number; edKJPerMol: number };
export type DecaySeries = { tempC: number; kdPerH: number | null; dots: { x: number; y: number; p: DecayPoint }[]; curve: string | null };
export type DecayGeometry = { box: Box; xTicks: Tick[]; yTicks: Tick[]; series: DecaySeries[] };

const CURVE_STEPS = 60;

/**
 * Residual activity (fraction, y up) against time (h) for each temperature, with the fitted first-order curve
 * A/A0 = exp(-kd(T) t) where kd(T) follows the fit's Arrhenius law. Pure: sizes in, SVG coordinates and paths out.
 */
export function decayGeometry(points: readonly DecayPoint[], fit: DecayFit | null, width: number, height: number): DecayGeometry {
  const box = plotBox(width, height);
  const maxT = Math.max(1e-9, ...points.map((p) => p.timeH));
  const maxY = Math.max(1.05, ...points.map((p) => p.residual));
  const x = scaleLinear().domain([0, maxT]).nice().range([box.left, box.right]);
  const y = scaleLinear().domain([0, maxY]).nice().range([box.bottom, box.top]);
  const temps = [...new Set(points.map((p) => p.tempC))].sort((a, b) => a - b);
  const path = line<[number, number]>()
    .x((d) => x(d[0]))
    .y((d) => y(d[1]));
  const tEnd = x.domain()[1]!;
  const series = temps.map((tempC) => {
    const kdPerH = fit ? fit.kdRefPerH * arrheniusFactor(fit.edKJPerMol, tempC, fit.tRefC) : null;
    const curve =
      kdPerH === null
        ? null
        : path(
            Array.from({ length: CURVE_STEPS + 1 }, (_, i) => {
              const t = (tEnd * i) / CURVE_STEPS;
              return [t, Math.exp(-kdPerH * t)] as [number, number];
            }),
          );
    const dots = points.filter((p) => p.tempC === tempC).map((p) => ({ x: x(p.timeH), y: y(p.residual), p }));
    return { tempC, kdPerH, dots, curve };
  });
  return { box, xTicks: ticksOf(x, 6, tickLabel), yTicks: ticksOf(y, 5, tickLabel), series };
}
