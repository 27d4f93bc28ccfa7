import { scaleLinear } from 'd3-scale';
import { arrheniusFactor } from '../../model/kinetics';
import { KELVIN_OFFSET } from '../../model/constants';
import { plotBox, tickLabel, ticksOf, type Box, type Tick } from './axes';

export type ArrheniusInput = {
  perTemperature: { c: number; kdPerH: number }[];
  fit: { tRefC: number; kdRefPerH: number; edKJPerMol: number } | null;
};
export type ArrheniusGeometry = {
  box: Box;
  xTicks: Tick[];
  yTicks: Tick[];
  dots: { x: number; y: number; c: number; kdPerH: number; invTPerK: number; lnKd: number }[];
  /** The one-step fit's straight line ln kd = ln kdRef - (Ed/R)(1/T - 1/Tref) across the data. */
  fitLine: { x1: number; y1: number; x2: number; y2: number } | null;
};

/** 1000/T in 1/K, the Arrhenius plot's x. */
export const invT1000 = (c: number) => 1000 / (c + KELVIN_OFFSET);

/**
 * The Arrhenius plot: ln kd (kd in 1/h) against 1000/T. Temperatures with no decay (kd <= 0) cannot be placed on a log
 * axis and are left out. Pure: sizes in, SVG coordinates out.
 */
export function arrheniusGeometry({ perTemperature, fit }: ArrheniusInput, width: number, height: number): ArrheniusGeometry {
  const box = plotBox(width, height);
  const usable = perTemperature.filter((p) => p.kdPerH > 0);
  const lnKdFit = (c: number) => (fit ? Math.log(fit.kdRefPerH * arrheniusFactor(fit.edKJPerMol, c, fit.tRefC)) : NaN);
  const xs = usable.map((p) => invT1000(p.c));
  const ys = usable.map((p) => Math.log(p.kdPerH));
  const temps = usable.map((p) => p.c);
  if (fit && temps.length) ys.push(lnKdFit(Math.min(...temps)), lnKdFit(Math.max(...temps)));
  const pad = (lo: number, hi: number) => (hi - lo > 1e-9 ? [lo, hi] : [lo - 0.5, hi + 0.5]);
  const [x0, x1] = xs.length ? pad(Math.min(...xs), Math.max(...xs)) : [2.9, 3.1];
  const [y0, y1] = ys.length ? pad(Math.min(...ys), Math.max(...ys)) : [-5, 0];
  const x = scaleLinear().domain([x0!, x1!]).nice().range([box.left, box.right]);
  const y = scaleLinear().domain([y0!, y1!]).nice().range([box.bottom, box.top]);
  const dots = usable.map((p) => ({
    x: x(invT1000(p.c)),
    y: y(Math.log(p.kdPerH)),
    c: p.c,
    kdPerH: p.kdPerH,
    invTPerK: invT1000(p.c),
    lnKd: Math.log(p.kdPerH),
  }));
  const fitLine =
    fit && temps.length
      ? (() => {
          const lo = Math.min(...temps);
          const hi = Math.max(...temps);
          return { x1: x(invT1000(hi)), y1: y(lnKdFit(hi)), x2: x(invT1000(lo)), y2: y(lnKdFit(lo)) };
        })()
      : null;
  return { box, xTicks: ticksOf(x, 5, tickLabel), yTicks: ticksOf(y, 5, tickLabel), dots, fitLine };
}
