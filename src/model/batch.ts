import { KELVIN_OFFSET, R } from './constants';
import { compileRates, lnKAt, lnVAt, slopeBoundK, softplus, type Rates } from './kinetics';
import { wrightOmega } from './lambert-w';
import { quadRule } from './quadrature';
import type {
  BatchState,
  EnzymeParams,
  Reading,
  SimulationResult,
  Substrate,
  TemperatureInput,
  TrajectoryPoint,
} from './types';

// Local bindings of hot imports: CommonJS transforms (tsx, esbuild) route every call to an imported
// function through a getter, which blocks inlining in the inner loops.
const lnVFast = lnVAt;
const lnKFast = lnKAt;
const omega = wrightOmega;
const softplusFast = softplus;

/** Mutable integration state: work x (g/L), activity a (fraction), inactivation integral kint = integral of kd dt. */
export interface WorkState {
  x: number;
  a: number;
  kint: number;
}

// Sub-piece size on ramps: ln k, ln v and the inactivation integral change by at most DELTA inside one.
const DELTA = 0.5;
const E_DELTA = Math.exp(DELTA);
// Rules by the variation inside a sub-piece (change of ln v, ln k plus the kd integral): measured on
// exp-shaped integrands, 3 nodes are exact to rounding up to 0.02, 4 up to 0.1, 6 up to 0.5 (3e-15).
const RULE_3 = quadRule(3);
const RULE_4 = quadRule(4);
const RULE_6 = quadRule(6);
const LV = new Float64Array(8);
const KK = new Float64Array(8);

/** Advance through a constant temperature (1/T in 1/K) for dur hours: closed form. */
export function advanceConstant(r: Rates, invT: number, dur: number, st: WorkState): void {
  if (!(dur > 0)) return;
  const k = Math.exp(lnKFast(r, invT));
  const kd = k * dur;
  if (st.a > 0) {
    const phi = kd > 1e-300 ? -Math.expm1(-kd) / k : dur;
    st.x += Math.exp(lnVFast(r, invT)) * st.a * phi;
    st.a *= Math.exp(-kd);
  }
  st.kint += kd;
}

/** Advance through a linear ramp c0 -> c1 (degC) over dur hours by Gauss-Legendre with spectral inner integrals. */
export function advanceRamp(r: Rates, c0: number, c1: number, dur: number, st: WorkState): void {
  if (!(dur > 0)) return;
  if (c0 === c1) {
    advanceConstant(r, 1 / (c0 + KELVIN_OFFSET), dur, st);
    return;
  }
  const t0 = c0 + KELVIN_OFFSET;
  const dT = c1 - c0;
  const tMin = Math.min(c0, c1) + KELVIN_OFFSET;
  const slopeLn = (slopeBoundK(r) * Math.abs(dT)) / (tMin * tMin * dur);
  let tau = 0;
  while (tau < dur) {
    const ta = t0 + (dT * tau) / dur;
    const kc = Math.exp(lnKFast(r, 1 / ta));
    const bound = Math.max(slopeLn, kc * E_DELTA);
    let h = dur - tau;
    if (bound * h > DELTA) {
      h = DELTA / bound;
      if (dur - tau - h < 1e-9 * dur) h = dur - tau;
    }
    const last = tau + h >= dur;
    const tb = last ? t0 + dT : t0 + (dT * (tau + h)) / dur;
    const variation = bound * h;
    const rule = variation <= 0.02 ? RULE_3 : variation <= 0.1 ? RULE_4 : RULE_6;
    const n = rule.n;
    const s = rule.s;
    const w = rule.w;
    const q = rule.q;
    const span = tb - ta;
    let kend = 0;
    for (let j = 0; j < n; j++) {
      const invT = 1 / (ta + span * s[j]);
      LV[j] = lnVFast(r, invT);
      KK[j] = Math.exp(lnKFast(r, invT));
      kend += w[j] * KK[j];
    }
    kend *= h;
    if (st.a > 0) {
      let sum = 0;
      for (let i = 0; i < n; i++) {
        let ki = 0;
        const row = i * n;
        for (let j = 0; j < n; j++) ki += q[row + j] * KK[j];
        sum += w[i] * Math.exp(LV[i] - h * ki);
      }
      st.x += st.a * h * sum;
      st.a *= Math.exp(-kend);
    }
    st.kint += kend;
    if (last) break;
    tau += h;
  }
}

function readingIndexAfter(log: readonly Reading[], t: number): number {
  // First index whose h is > t.
  let lo = 0;
  let hi = log.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (log[mid].h <= t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Temperature in degC at time h of a program (log: linear between readings, held outside them). */
export function temperatureAt(temp: TemperatureInput, h: number): number {
  if ('setpointC' in temp) return temp.setpointC;
  if ('stages' in temp) {
    let t = 0;
    const st = temp.stages;
    for (let i = 0; i < st.length; i++) {
      t += st[i].hours;
      if (h < t) return st[i].c;
    }
    return st[st.length - 1].c;
  }
  const log = temp.log;
  const i = readingIndexAfter(log, h);
  if (i === 0) return log[0].c;
  if (i === log.length) return log[log.length - 1].c;
  const a = log[i - 1];
  const b = log[i];
  return a.c + ((b.c - a.c) * (h - a.h)) / (b.h - a.h);
}

/** Integrate a temperature program between two batch times (h) into the state. */
export function integrateProgram(r: Rates, temp: TemperatureInput, from: number, to: number, st: WorkState): void {
  if (!(to > from)) return;
  if ('setpointC' in temp) {
    advanceConstant(r, 1 / (temp.setpointC + KELVIN_OFFSET), to - from, st);
    return;
  }
  if ('stages' in temp) {
    const stages = temp.stages;
    let t = 0;
    for (let i = 0; i < stages.length; i++) {
      const end = i === stages.length - 1 ? Math.max(to, t + stages[i].hours) : t + stages[i].hours;
      const a = Math.max(t, from);
      const b = Math.min(end, to);
      if (b > a) advanceConstant(r, 1 / (stages[i].c + KELVIN_OFFSET), b - a, st);
      t = end;
      if (t >= to) break;
    }
    return;
  }
  const log = temp.log;
  const n = log.length;
  let t = from;
  let i = readingIndexAfter(log, t);
  if (i === 0) {
    const b = Math.min(log[0].h, to);
    if (b > t) advanceConstant(r, 1 / (log[0].c + KELVIN_OFFSET), b - t, st);
    t = b;
  }
  if (i === 0) i = 1;
  while (t < to && i < n) {
    const ra = log[i - 1];
    const rb = log[i];
    const b = Math.min(rb.h, to);
    if (b > t && rb.h > ra.h) {
      const slope = (rb.c - ra.c) / (rb.h - ra.h);
      const ca = t === ra.h ? ra.c : ra.c + slope * (t - ra.h);
      const cb = b === rb.h ? rb.c : ra.c + slope * (b - ra.h);
      advanceRamp(r, ca, cb, b - t, st);
    }
    if (b > t) t = b;
    i++;
  }
  if (t < to) advanceConstant(r, 1 / (log[n - 1].c + KELVIN_OFFSET), to - t, st);
}

/** Product (g/L) made by accumulated work x (g/L): S = Km W0((S0/Km) e^((S0-x)/Km)) in log form, polished with log1p. */
export function productFromWork(x: number, s0: number, km: number): number {
  if (!(x > 0)) return 0;
  const l = Math.log(s0 / km) + (s0 - x) / km;
  let s = km * omega(l);
  if (s > s0) s = s0;
  let p = s0 - s;
  if (s > 0.5 * s0) {
    // S0 - S cancels at low conversion; one Newton step on P - Km ln(1 - P/S0) = x restores the digits
    // (the error left is of order (eps S0)^2 / S0).
    const f = p - km * Math.log1p(-p / s0) - x;
    p -= f / (1 + km / (s0 - p));
    if (p < 0) p = 0;
  }
  return p;
}

/** Start state of a fresh batch, or a copy of a given one. */
export function startState(start?: BatchState): WorkState {
  return { x: start ? start.workGPerL : 0, a: start ? start.activity : 1, kint: 0 };
}

/** Simulate a batch of batchH hours: product and conversion (g/L, fraction), activity left, work done (g/L). */
export function simulate(
  enzyme: EnzymeParams,
  substrate: Substrate,
  batchH: number,
  temperature: TemperatureInput,
  start?: BatchState,
): SimulationResult {
  const s0 = substrate.s0GPerL;
  if ('setpointC' in temperature) {
    // One constant segment: skip compiling the rates (two logarithms and an object) on this hot path.
    const dInv = 1 / (temperature.setpointC + KELVIN_OFFSET) - 1 / (enzyme.tRefC + KELVIN_OFFSET);
    let k = enzyme.kdRefPerH * Math.exp(((-enzyme.edKJPerMol * 1000) / R) * dInv);
    let v = enzyme.vmaxRef * Math.exp(((-enzyme.eaKJPerMol * 1000) / R) * dInv);
    const eq = enzyme.equilibrium;
    if (eq) {
      const lnKeq = ((eq.dHeqKJPerMol * 1000) / R) * (1 / (eq.teqC + KELVIN_OFFSET) - 1 / (temperature.setpointC + KELVIN_OFFSET));
      v *= Math.exp(-softplusFast(lnKeq));
      k *= Math.exp(-softplusFast(-lnKeq));
    }
    const a0 = start ? start.activity : 1;
    const kt = k * batchH;
    const x = (start ? start.workGPerL : 0) + v * a0 * (kt > 1e-300 ? -Math.expm1(-kt) / k : batchH);
    const p = productFromWork(x, s0, substrate.kmGPerL);
    return { productGPerL: p, conversion: p / s0, residualActivity: a0 * Math.exp(-kt), workGPerL: x };
  }
  const r = compileRates(enzyme);
  const st = startState(start);
  integrateProgram(r, temperature, 0, batchH, st);
  const p = productFromWork(st.x, s0, substrate.kmGPerL);
  return { productGPerL: p, conversion: p / s0, residualActivity: st.a, workGPerL: st.x };
}

/** Product and activity at `points` evenly spaced times over the batch (h, degC, g/L, fraction), for charts. */
export function trajectory(
  enzyme: EnzymeParams,
  substrate: Substrate,
  batchH: number,
  temperature: TemperatureInput,
  points = 101,
  start?: BatchState,
): TrajectoryPoint[] {
  const r = compileRates(enzyme);
  const st = startState(start);
  const n = Math.max(2, Math.floor(points));
  const out: TrajectoryPoint[] = [];
  let prev = 0;
  for (let j = 0; j < n; j++) {
    const t = j === n - 1 ? batchH : (batchH * j) / (n - 1);
    integrateProgram(r, temperature, prev, t, st);
    prev = t;
    out.push({
      h: t,
      c: temperatureAt(temperature, t),
      productGPerL: productFromWork(st.x, substrate.s0GPerL, substrate.kmGPerL),
      activity: st.a,
    });
  }
  return out;
}
