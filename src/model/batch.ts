import { KELVIN_OFFSET, R } from './constants';
import { compileRates, lnK2At, lnKAt, lnVAt, LN_RATE_CAP, slopeBoundK, softplus, type Rates } from './kinetics';
import { wrightOmega } from './lambert-w';
import { quadRule } from './quadrature';
import type { BatchState, EnzymeParams, Reading, SimulationResult, Substrate, TemperatureInput, TrajectoryPoint } from './types';

// Local bindings of hot imports: CommonJS transforms (tsx, esbuild) route every call to an imported
// function through a getter, which blocks inlining in the inner loops.
const lnVFast = lnVAt;
const lnKFast = lnKAt;
const lnK2Fast = lnK2At;
const omega = wrightOmega;
const softplusFast = softplus;
const slopeBound = slopeBoundK;
const K0 = KELVIN_OFFSET;
const GAS = R;
const CAP = LN_RATE_CAP;

/**
 * Mutable integration state: work x (g/L); activity a of the labile fraction and b of the stable fraction,
 * each as a fraction of the total activity at h = 0 (one fraction: b = 0); kint = integral of the labile kd dt.
 */
export interface WorkState {
  x: number;
  a: number;
  b: number;
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
const KK2 = new Float64Array(8);

/**
 * e^x; for |x| <= 1/32 by its Taylor polynomial to x^8 (the remainder is below 1e-19 of the value, so the result is
 * e^x to rounding), cheaper than Math.exp.
 */
function expNear(x: number): number {
  if (!(x >= -0.03125 && x <= 0.03125)) return Math.exp(x);
  const x2 = x * x;
  const x4 = x2 * x2;
  return 1 + x + x2 * (0.5 + x * (1 / 6)) + x4 * (1 / 24 + x * (1 / 120) + x2 * (1 / 720 + x * (1 / 5040)) + x4 * (1 / 40320));
}

/** (1 - e^(-k t))/k in h for k in 1/h: the work per unit rate and activity over t hours at constant k. */
function decayIntegral(k: number, t: number): number {
  const kt = k * t;
  return kt > 1e-300 ? -Math.expm1(-kt) / k : t;
}

/** Advance through a constant temperature (1/T in 1/K) for dur hours: closed form, a sum of two exponential integrals with two fractions. */
export function advanceConstant(r: Rates, invT: number, dur: number, st: WorkState): void {
  if (!(dur > 0)) return;
  const k = Math.exp(lnKFast(r, invT));
  const kd = k * dur;
  if (st.a > 0 || st.b > 0) {
    let w = st.a * decayIntegral(k, dur);
    st.a *= Math.exp(-kd);
    if (st.b > 0) {
      const k2 = Math.exp(lnK2Fast(r, invT));
      w += st.b * decayIntegral(k2, dur);
      st.b *= Math.exp(-k2 * dur);
    }
    // In logs: a huge Arrhenius factor on V meets a vanishing integral of the activity (Infinity x 0).
    if (w > 0) st.x += Math.exp(lnVFast(r, invT) + Math.log(w));
  }
  st.kint += kd;
}

/**
 * The common ramp of a log (one fraction, pure Arrhenius, rates changing little between readings) as one piece
 * of 3 or 4 nodes: the same rules and arithmetic as advanceRamp's loop, without its pass to bound kd at the
 * piece's start. Any kd in the piece is within e^(slopeLn dur) <= e^DELTA of kd at the first node, which then
 * bounds the decay as kd at the start does in the loop. False (state untouched) when the piece needs the loop.
 */
function rampInOnePiece(r: Rates, t0: number, dT: number, dur: number, slopeLn: number, st: WorkState): boolean {
  const lnVRef = r.lnVRef;
  const eaR = r.eaR;
  const lnKdRef = r.lnKdRef;
  const edR = r.edR;
  const invTRef = r.invTRef;
  const slopeVar = slopeLn * dur;
  let rule = slopeVar <= 0.02 ? RULE_3 : RULE_4;
  let n = rule.n;
  let s = rule.s;
  let k0 = 0;
  for (let pass = 0; pass < 2; pass++) {
    for (let j = 0; j < n; j++) {
      const invT = 1 / (t0 + dT * s[j]);
      const dInv = invT - invTRef;
      let lnV = lnVRef - eaR * dInv;
      if (lnV > CAP) lnV = CAP;
      let lnK = lnKdRef - edR * dInv;
      if (lnK > CAP) lnK = CAP;
      LV[j] = lnV;
      KK[j] = lnK;
    }
    k0 = Math.exp(KK[0]);
    const variation = Math.max(slopeLn, k0 * E_DELTA) * dur;
    if (variation > 0.1) return false;
    const fit = variation <= 0.02 ? RULE_3 : RULE_4;
    if (fit === rule) break;
    if (pass === 1) return false;
    rule = fit;
    n = rule.n;
    s = rule.s;
  }
  const w = rule.w;
  const q = rule.q;
  // Within a piece ln kd and the exponents of the work's integrand change by at most its variation (<= 0.1):
  // node values from the first node's exponential times expNear of the difference (exact to rounding).
  const lnK0 = KK[0];
  KK[0] = k0;
  let kend = w[0] * k0;
  for (let j = 1; j < n; j++) {
    const kj = k0 * expNear(KK[j] - lnK0);
    KK[j] = kj;
    kend += w[j] * kj;
  }
  kend *= dur;
  let sum = 0;
  let e0 = 0;
  let v0 = 0;
  for (let i = 0; i < n; i++) {
    let ki = 0;
    const row = i * n;
    for (let j = 0; j < n; j++) ki += q[row + j] * KK[j];
    const e = LV[i] - dur * ki;
    if (i === 0) {
      e0 = e;
      v0 = Math.exp(e);
      sum += w[0] * v0;
    } else sum += w[i] * (v0 * expNear(e - e0));
  }
  st.x += dur * (st.a * sum);
  st.a *= expNear(-kend);
  if (st.a < 1e-300) st.a = 0;
  st.kint += kend;
  return true;
}

/** Advance through a linear ramp c0 -> c1 (degC) over dur hours by Gauss-Legendre with spectral inner integrals. */
export function advanceRamp(r: Rates, c0: number, c1: number, dur: number, st: WorkState): void {
  if (!(dur > 0)) return;
  if (c0 === c1) {
    advanceConstant(r, 1 / (c0 + K0), dur, st);
    return;
  }
  const t0 = c0 + K0;
  const dT = c1 - c0;
  const tMin = Math.min(c0, c1) + K0;
  const slopeLn = (slopeBound(r) * Math.abs(dT)) / (tMin * tMin * dur);
  if (st.b === 0 && st.a > 0 && !r.hasEq && slopeLn * dur <= 0.1 && rampInOnePiece(r, t0, dT, dur, slopeLn, st)) return;
  let two = st.b > 0;
  let tau = 0;
  while (tau < dur) {
    const ta = t0 + (dT * tau) / dur;
    // Pieces are cut by the decay inside them only while there is activity to decay: once it has underflowed,
    // only the change of the rates matters (an enormous kd would otherwise ask for astronomically many pieces).
    let kc = st.a > 0 ? Math.exp(lnKFast(r, 1 / ta)) : 0;
    if (two && st.b > 0) kc = Math.max(kc, Math.exp(lnK2Fast(r, 1 / ta)));
    const bound = Math.max(slopeLn, kc * E_DELTA);
    let h = dur - tau;
    if (bound * h > DELTA) {
      h = DELTA / bound;
      // A piece below the rounding of tau cannot advance it: the activity then dies within a few ulps, and
      // whatever work is left there is far below rounding of the total.
      if (dur - tau - h < 1e-9 * dur || tau + h === tau) h = dur - tau;
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
    let kend2 = 0;
    for (let j = 0; j < n; j++) {
      const invT = 1 / (ta + span * s[j]);
      LV[j] = lnVFast(r, invT);
      KK[j] = Math.exp(lnKFast(r, invT));
      kend += w[j] * KK[j];
      if (two) {
        KK2[j] = Math.exp(lnK2Fast(r, invT));
        kend2 += w[j] * KK2[j];
      }
    }
    kend *= h;
    if (st.a > 0 || two) {
      let sum = 0;
      for (let i = 0; i < n; i++) {
        let ki = 0;
        const row = i * n;
        for (let j = 0; j < n; j++) ki += q[row + j] * KK[j];
        let term = st.a * Math.exp(LV[i] - h * ki);
        if (two) {
          let ki2 = 0;
          for (let j = 0; j < n; j++) ki2 += q[row + j] * KK2[j];
          term += st.b * Math.exp(LV[i] - h * ki2);
        }
        sum += w[i] * term;
      }
      st.x += h * sum;
      st.a *= Math.exp(-kend);
      // Activity below 1e-300 of the start is gone: flush it, as a denormal times e^-0.5 rounds back to itself.
      if (st.a < 1e-300) st.a = 0;
      if (two) {
        st.b *= Math.exp(-kend2 * h);
        if (st.b < 1e-300) {
          st.b = 0;
          two = false;
        }
      }
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

/**
 * Walk a temperature program between two batch times (h) as the pieces the engine integrates: constant
 * temperatures (setpoint, stages, before the first and after the last reading) and linear ramps between readings.
 * `simulate` integrates them; `sensitivity.ts` lays them out for its derivatives.
 */
export function walkProgram(
  temp: TemperatureInput,
  from: number,
  to: number,
  constant: (c: number, dur: number) => void,
  ramp: (c0: number, c1: number, dur: number) => void,
): void {
  if (!(to > from)) return;
  if ('setpointC' in temp) {
    constant(temp.setpointC, to - from);
    return;
  }
  if ('stages' in temp) {
    const stages = temp.stages;
    let t = 0;
    for (let i = 0; i < stages.length; i++) {
      const end = i === stages.length - 1 ? Math.max(to, t + stages[i].hours) : t + stages[i].hours;
      const a = Math.max(t, from);
      const b = Math.min(end, to);
      if (b > a) constant(stages[i].c, b - a);
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
    if (b > t) constant(log[0].c, b - t);
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
      ramp(ca, cb, b - t);
    }
    if (b > t) t = b;
    i++;
  }
  if (t < to) constant(log[n - 1].c, to - t);
}

/** Integrate a temperature program between two batch times (h) into the state. */
export function integrateProgram(r: Rates, temp: TemperatureInput, from: number, to: number, st: WorkState): void {
  walkProgram(
    temp,
    from,
    to,
    (c, dur) => advanceConstant(r, 1 / (c + K0), dur, st),
    (c0, c1, dur) => advanceRamp(r, c0, c1, dur, st),
  );
}

/** Product (g/L) made by accumulated work x (g/L): S = Km W0((S0/Km) e^((S0-x)/Km)) in log form, polished with log1p. */
function productMichaelisMenten(x: number, s0: number, km: number): number {
  const l = Math.log(s0) - Math.log(km) + (s0 - x) / km;
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

/**
 * Product (g/L) for work x (g/L) with competitive product inhibition (1/Ki, L/g) and substrate inhibition
 * (1/Ksi, L/g): the root of x = c1 ln(S0/S) + (1 - Km/Ki) P + (S0^2 - S^2)/(2 Ksi), c1 = Km (1 + S0/Ki),
 * P = S0 - S, by Newton kept inside a bracket (bisection when a step leaves it). The left side rises with P
 * (its derivative is 1/rate), so the root is unique. Low conversion: Newton on P with log1p, so P keeps its
 * digits; high conversion: Newton on ln S, so S keeps its digits down to underflow.
 */
function productInhibited(x: number, s0: number, km: number, iKi: number, iKsi: number): number {
  const c1 = km * (1 + s0 * iKi);
  const lin = 1 - km * iKi;
  const half = 0.5 * s0;
  if (c1 * Math.LN2 + lin * half + 0.375 * s0 * s0 * iKsi - x >= 0) {
    let lo = 0;
    let hi = half;
    // x / F'(0): from below the root when F is convex, which it is unless substrate inhibition is strong.
    let p = Math.min(half, x / (km / s0 + 1 + s0 * iKsi));
    for (let i = 0; i < 100; i++) {
      const s = s0 - p;
      const f = -c1 * Math.log1p(-p / s0) + lin * p + 0.5 * p * (s0 + s) * iKsi - x;
      if (f === 0) return p;
      if (f > 0) hi = p;
      else lo = p;
      let next = p - f / ((km * (1 + p * iKi)) / s + 1 + s * iKsi);
      if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
      const done = Math.abs(next - p) <= 2e-16 * next || hi - lo <= 2e-16 * hi;
      p = next;
      if (done) break;
    }
    return p;
  }
  const lnS0 = Math.log(s0);
  // Asymptote for S << S0; the true root lies below it (or above by under eps S0), so S has underflowed
  // against S0 once the asymptote is 40 e-folds down.
  let y = lnS0 - (x - lin * s0 - 0.5 * s0 * s0 * iKsi) / c1;
  if (!(y > lnS0 - 40)) return s0;
  // G(yLo) >= 0 because the non-logarithmic terms are at least -Km S0/Ki.
  let yLo = lnS0 - (x + km * s0 * iKi) / c1;
  let yHi = lnS0 - Math.LN2;
  if (!(y > yLo && y < yHi)) y = 0.5 * (yLo + yHi);
  for (let i = 0; i < 100; i++) {
    const s = Math.exp(y);
    const p = s0 - s;
    const g = c1 * (lnS0 - y) + lin * p + 0.5 * p * (s0 + s) * iKsi - x;
    if (g === 0) break;
    if (g > 0) yLo = y;
    else yHi = y;
    let next = y + g / (km * (1 + p * iKi) + s + s * s * iKsi);
    if (!(next > yLo && next < yHi)) next = 0.5 * (yLo + yHi);
    const done = Math.abs(next - y) <= 4e-16 * Math.max(1, Math.abs(y)) || yHi - yLo <= 4e-16 * Math.max(1, Math.abs(y));
    y = next;
    if (done) break;
  }
  return s0 - Math.exp(y);
}

/** Product (g/L) made by accumulated work x (g/L) for a substrate charge; absent Ki and Ksi: the plain integrated Michaelis-Menten law. */
export function productFromWork(x: number, substrate: Substrate): number {
  if (!(x > 0)) return 0;
  const s0 = substrate.s0GPerL;
  const ki = substrate.kiGPerL;
  const ksi = substrate.ksiGPerL;
  if (ki === undefined && ksi === undefined) return productMichaelisMenten(x, s0, substrate.kmGPerL);
  return productInhibited(x, s0, substrate.kmGPerL, ki === undefined ? 0 : 1 / ki, ksi === undefined ? 0 : 1 / ksi);
}

/** Start state of a fresh batch, or of a given one (no stable part given: split as at h = 0). */
export function startState(r: Rates, start?: BatchState): WorkState {
  const total = start ? start.activity : 1;
  const b = r.share > 0 ? (start?.stableActivity ?? r.share * total) : 0;
  return { x: start ? start.workGPerL : 0, a: total - b, b, kint: 0 };
}

/** The engine's answer for a state: work saturates at the largest double instead of overflowing (product is then S0). */
export function resultOf(st: WorkState, substrate: Substrate, hasStable: boolean): SimulationResult {
  const x = Math.min(st.x, Number.MAX_VALUE);
  const p = productFromWork(x, substrate);
  const out: SimulationResult = { productGPerL: p, conversion: p / substrate.s0GPerL, residualActivity: st.a + st.b, workGPerL: x };
  if (hasStable) out.stableActivity = st.b;
  return out;
}

/** Simulate a batch of batchH hours: product and conversion (g/L, fraction), activity left, work done (g/L). */
export function simulate(enzyme: EnzymeParams, substrate: Substrate, batchH: number, temperature: TemperatureInput, start?: BatchState): SimulationResult {
  if ('setpointC' in temperature && !enzyme.stableFraction) {
    // One constant segment: skip compiling the rates (two logarithms and an object) on this hot path.
    const dInv = 1 / (temperature.setpointC + K0) - 1 / (enzyme.tRefC + K0);
    let lnK = Math.log(enzyme.kdRefPerH) + ((-enzyme.edKJPerMol * 1000) / GAS) * dInv;
    let lnV = Math.log(enzyme.vmaxRef) + ((-enzyme.eaKJPerMol * 1000) / GAS) * dInv;
    const eq = enzyme.equilibrium;
    if (eq) {
      const lnKeq = ((eq.dHeqKJPerMol * 1000) / GAS) * (1 / (eq.teqC + K0) - 1 / (temperature.setpointC + K0));
      lnV -= softplusFast(lnKeq);
      lnK -= softplusFast(-lnKeq);
    }
    if (lnK > LN_RATE_CAP) lnK = LN_RATE_CAP;
    if (lnV > LN_RATE_CAP) lnV = LN_RATE_CAP;
    const k = Math.exp(lnK);
    const a0 = start ? start.activity : 1;
    const kt = k * batchH;
    // In logs, so that a huge Arrhenius factor on V meets the vanishing integral of activity without Infinity x 0.
    const phi = kt > 1e-300 ? -Math.expm1(-kt) / k : batchH;
    let x = (start ? start.workGPerL : 0) + (a0 > 0 ? Math.exp(lnV + Math.log(a0 * phi)) : 0);
    if (x > Number.MAX_VALUE) x = Number.MAX_VALUE;
    const p = productFromWork(x, substrate);
    return { productGPerL: p, conversion: p / substrate.s0GPerL, residualActivity: a0 * Math.exp(-kt), workGPerL: x };
  }
  const r = compileRates(enzyme);
  const st = startState(r, start);
  integrateProgram(r, temperature, 0, batchH, st);
  return resultOf(st, substrate, r.share > 0);
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
  const st = startState(r, start);
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
      productGPerL: productFromWork(Math.min(st.x, Number.MAX_VALUE), substrate),
      activity: st.a + st.b,
    });
  }
  return out;
}
