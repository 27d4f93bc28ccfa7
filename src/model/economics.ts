import { brentMax, scanMax } from './brent';
import { productFromWork, simulate } from './batch';
import { compileRates } from './kinetics';
import { lnWorkIsothermal, optimalSetpointC } from './optimise';
import type { EnzymeParams, Substrate, TemperatureInput } from './types';

// Local bindings of hot imports: CommonJS transforms (tsx, esbuild) route every call to an imported
// function through a getter, which blocks inlining in the inner loops.
const lnWorkFast = lnWorkIsothermal;
const productFast = productFromWork;

/** Plant economics of one recipe; money in any one currency. */
export interface EconomicsParams {
  /** Selling value of product, currency per kg. */
  productPricePerKg: number;
  /** Working volume, L. */
  volumeL: number;
  /** Enzyme charged per batch, currency per batch. */
  enzymeCostPerBatch: number;
  /** Heating and holding cost, currency per (degC above ambient x hour of batch). */
  heatingCostPerDegCHour: number;
  /** Ambient temperature the vessel would sit at unheated, degC. */
  ambientC: number;
  /** Empty, clean, fill and heat-up time between batches, h. */
  turnaroundH: number;
  /** Any other cost per batch (substrate, labour), currency per batch; default 0. */
  otherCostPerBatch?: number;
}

export interface EconomicsResult {
  productGPerL: number;
  productKg: number;
  revenue: number;
  enzymeCost: number;
  heatingCost: number;
  otherCost: number;
  profitPerBatch: number;
  /** Batch plus turnaround, h. */
  reactorH: number;
  /** Profit per hour of reactor time, currency/h. */
  profitPerH: number;
}

/** Degree-hours above ambient (degC h) of a temperature program over batchH hours; logs integrate the positive part exactly. */
export function degreeHoursAbove(temp: TemperatureInput, batchH: number, ambientC: number): number {
  if ('setpointC' in temp) return Math.max(0, temp.setpointC - ambientC) * batchH;
  if ('stages' in temp) {
    let t = 0;
    let sum = 0;
    const st = temp.stages;
    for (let i = 0; i < st.length && t < batchH; i++) {
      const end = i === st.length - 1 ? batchH : Math.min(batchH, t + st[i].hours);
      sum += Math.max(0, st[i].c - ambientC) * Math.max(0, end - t);
      t = end;
    }
    return sum;
  }
  const log = temp.log;
  let sum = 0;
  const pos = (c: number) => Math.max(0, c - ambientC);
  // Linear piece a -> b over d hours: integral of the positive part.
  const piece = (ca: number, cb: number, d: number) => {
    const a = ca - ambientC;
    const b = cb - ambientC;
    if (d <= 0) return 0;
    if (a >= 0 && b >= 0) return ((a + b) / 2) * d;
    if (a <= 0 && b <= 0) return 0;
    const hi = Math.max(a, b);
    return ((hi * hi) / (2 * Math.abs(b - a))) * d;
  };
  const first = log[0];
  if (first.h > 0) sum += pos(first.c) * Math.min(first.h, batchH);
  for (let i = 1; i < log.length; i++) {
    const a = log[i - 1];
    const b = log[i];
    if (a.h >= batchH) break;
    if (b.h <= a.h) continue;
    const end = Math.min(b.h, batchH);
    const cEnd = end === b.h ? b.c : a.c + ((b.c - a.c) * (end - a.h)) / (b.h - a.h);
    sum += piece(a.c, cEnd, end - a.h);
  }
  const last = log[log.length - 1];
  if (last.h < batchH) sum += pos(last.c) * (batchH - Math.max(last.h, 0));
  return sum;
}

function costs(econ: EconomicsParams, productGPerL: number, degreeHours: number, batchH: number): EconomicsResult {
  const productKg = (productGPerL * econ.volumeL) / 1000;
  const revenue = productKg * econ.productPricePerKg;
  const heatingCost = econ.heatingCostPerDegCHour * degreeHours;
  const otherCost = econ.otherCostPerBatch ?? 0;
  const profitPerBatch = revenue - econ.enzymeCostPerBatch - heatingCost - otherCost;
  const reactorH = batchH + econ.turnaroundH;
  return {
    productGPerL,
    productKg,
    revenue,
    enzymeCost: econ.enzymeCostPerBatch,
    heatingCost,
    otherCost,
    profitPerBatch,
    reactorH,
    profitPerH: profitPerBatch / reactorH,
  };
}

/** Money of one batch run under a temperature program: revenue, costs, profit per batch and per reactor hour. */
export function economics(enzyme: EnzymeParams, substrate: Substrate, batchH: number, temperature: TemperatureInput, econ: EconomicsParams): EconomicsResult {
  const sim = simulate(enzyme, substrate, batchH, temperature);
  return costs(econ, sim.productGPerL, degreeHoursAbove(temperature, batchH, econ.ambientC), batchH);
}

export interface EconomicOptimum extends EconomicsResult {
  batchH: number;
  setpointC: number;
  atBound: { batch: 'lower' | 'upper' | null; setpoint: 'lower' | 'upper' | null };
}

/** Best isothermal setpoint (degC) for profit per batch at a fixed batch length (h). */
export function profitSetpointC(enzyme: EnzymeParams, substrate: Substrate, batchH: number, boundsC: [number, number], econ: EconomicsParams): number {
  const [lo] = boundsC;
  const best = optimalSetpointC(enzyme, batchH, boundsC);
  if (!(econ.heatingCostPerDegCHour > 0)) return best;
  const r = compileRates(enzyme);
  const money = (c: number) => {
    const x = Math.exp(lnWorkFast(r, c, batchH));
    const p = productFast(x, substrate);
    return costs(econ, p, Math.max(0, c - econ.ambientC) * batchH, batchH).profitPerBatch;
  };
  // Heating cost only pulls the setpoint down from the work optimum.
  if (best <= lo) return lo;
  const res = scanMax(money, lo, best, Math.min(401, Math.max(21, Math.ceil((best - lo) / 0.25) + 1)), 1e-7);
  return money(best) >= res.fx ? best : res.x;
}

function evaluateAt(enzyme: EnzymeParams, substrate: Substrate, batchH: number, boundsC: [number, number], econ: EconomicsParams): EconomicOptimum {
  const c = profitSetpointC(enzyme, substrate, batchH, boundsC, econ);
  const res = economics(enzyme, substrate, batchH, { setpointC: c }, econ);
  return {
    ...res,
    batchH,
    setpointC: c,
    atBound: { batch: null, setpoint: c <= boundsC[0] ? 'lower' : c >= boundsC[1] ? 'upper' : null },
  };
}

/** Batch length (h, within batchBoundsH) and setpoint (degC, within boundsC) chosen together for the most profit per reactor hour. */
export function optimizeEconomics(
  enzyme: EnzymeParams,
  substrate: Substrate,
  boundsC: [number, number],
  batchBoundsH: [number, number],
  econ: EconomicsParams,
): EconomicOptimum {
  const [bLo, bHi] = batchBoundsH;
  const lnLo = Math.log(bLo);
  const lnHi = Math.log(bHi);
  const f = (lnB: number) => evaluateAt(enzyme, substrate, Math.exp(lnB), boundsC, econ).profitPerH;
  let lnBest: number;
  if (!(lnHi > lnLo)) lnBest = lnLo;
  else {
    const n = 41;
    let bestI = 0;
    let bestF = -Infinity;
    for (let i = 0; i < n; i++) {
      const v = f(lnLo + ((lnHi - lnLo) * i) / (n - 1));
      if (v > bestF) {
        bestF = v;
        bestI = i;
      }
    }
    const step = (lnHi - lnLo) / (n - 1);
    const a = Math.max(lnLo, lnLo + (bestI - 1) * step);
    const b = Math.min(lnHi, lnLo + (bestI + 1) * step);
    const res = brentMax(f, a, b, 1e-10);
    lnBest = res.fx >= bestF ? res.x : lnLo + bestI * step;
    if (f(lnLo) >= Math.max(res.fx, bestF)) lnBest = lnLo;
    if (f(lnHi) > Math.max(res.fx, bestF)) lnBest = lnHi;
  }
  const batchH = lnBest <= lnLo ? bLo : lnBest >= lnHi ? bHi : Math.exp(lnBest);
  const out = evaluateAt(enzyme, substrate, batchH, boundsC, econ);
  out.atBound.batch = batchH <= bLo ? 'lower' : batchH >= bHi ? 'upper' : null;
  return out;
}

/** Profit per reactor hour (currency/h) at each batch length (h), each at its own best setpoint, for a chart. */
export function profitCurve(
  enzyme: EnzymeParams,
  substrate: Substrate,
  boundsC: [number, number],
  batchHs: number[],
  econ: EconomicsParams,
): { batchH: number; setpointC: number; productGPerL: number; profitPerH: number }[] {
  return batchHs.map((b) => {
    const e = evaluateAt(enzyme, substrate, b, boundsC, econ);
    return { batchH: b, setpointC: e.setpointC, productGPerL: e.productGPerL, profitPerH: e.profitPerH };
  });
}
