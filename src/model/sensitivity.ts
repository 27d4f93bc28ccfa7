import { KELVIN_OFFSET, R } from './constants';
import { compileRates, lnKAt, lnVAt, slopeBoundK, type Rates } from './kinetics';
import { productFromWork } from './batch';
import { quadRule, type QuadRule } from './quadrature';
import type { EnzymeParams, Substrate, TemperatureInput } from './types';

// Forward-mode sensitivity of a batch's product to theta = [ln kdRefPerH, edKJPerMol, ln vmaxScale]: the same
// closed forms and Gauss-Legendre rules as batch.ts, with the three derivatives carried through one pass.
// With a(t) = exp(-K(t)), K = integral of kd dt: d a/d ln kd = -a K and d a/d(Ed/R) = a M, M = integral of
// kd (1/T - 1/TRef) dt, so dX/d ln kd = -integral V a K dt and dX/d(Ed/R) = integral V a M dt; X is linear in
// the Vmax scale. A batch is compiled once (node temperatures, ln V, sub-pieces) and evaluated at many theta.

const DELTA = 0.5;
const E_DELTA = Math.exp(DELTA);
const RULE_3 = quadRule(3);
const RULE_4 = quadRule(4);
const RULE_6 = quadRule(6);
const ruleOf = (n: number): QuadRule => (n === 3 ? RULE_3 : n === 4 ? RULE_4 : RULE_6);
// The 3-node rule (every sub-piece of a 1-minute log) unrolled: its weights and integration matrix.
const W0 = RULE_3.w[0], W1 = RULE_3.w[1], W2 = RULE_3.w[2];
const [Q00, Q01, Q02, Q10, Q11, Q12, Q20, Q21, Q22] = Array.from(RULE_3.q);
// The sub-pieces are cut for kd up to KD_MARGIN times its value at the compile point and Ed/R up to
// 10 % (at least 10 kJ/mol) above it, so the rules stay exact to rounding for every theta in that box.
const KD_MARGIN = 2;
const LN_KD_MARGIN = Math.log(KD_MARGIN);
const ED_MARGIN = 0.1;
const KJ_PER_R = 1000 / R;

/** A batch's temperature program laid out for repeated evaluation. */
export interface CompiledBatch {
  /** Per segment: node count (1 = constant temperature, closed form), duration h, offset of its first node. */
  kind: Uint8Array;
  dur: Float64Array;
  first: Uint32Array;
  /** Per node: 1/T - 1/TRef (1/K), ln Vmax at vmaxScale 1 (g/L/h), Equilibrium Model offset of ln kd. */
  u: Float64Array;
  lnV: Float64Array;
  lnKOff: Float64Array;
  uMin: number;
  uMax: number;
  /** Compile point and the box of theta it serves. */
  lnKdC: number;
  edRC: number;
  edRMax: number;
  source: { rates: Rates; temperature: TemperatureInput; batchH: number };
}

/** Work X (g/L) and its derivatives by ln kdRefPerH, Ed/R (K) and ln vmaxScale. */
export interface WorkSensitivity {
  x: number;
  dLnKd: number;
  dEdR: number;
  dLnScale: number;
}

/** Product (g/L) and its gradient by [ln kdRefPerH, edKJPerMol (kJ/mol), ln vmaxScale]. */
export interface ProductSensitivity {
  productGPerL: number;
  gradient: [number, number, number];
}

interface Piece {
  c0: number;
  c1: number;
  dur: number;
}

// Constant and linear pieces of a program from 0 to batchH, cut as integrateProgram cuts them.
function pieces(temp: TemperatureInput, batchH: number): Piece[] {
  if ('setpointC' in temp) return [{ c0: temp.setpointC, c1: temp.setpointC, dur: batchH }];
  const out: Piece[] = [];
  if ('stages' in temp) {
    const st = temp.stages;
    let t = 0;
    for (let i = 0; i < st.length && t < batchH; i++) {
      const end = i === st.length - 1 ? Math.max(batchH, t + st[i].hours) : t + st[i].hours;
      const b = Math.min(end, batchH);
      if (b > t) out.push({ c0: st[i].c, c1: st[i].c, dur: b - t });
      t = end;
    }
    return out;
  }
  const log = temp.log;
  const n = log.length;
  let i = 0;
  while (i < n && log[i].h <= 0) i++;
  let t = 0;
  if (i === 0) {
    t = Math.min(log[0].h, batchH);
    out.push({ c0: log[0].c, c1: log[0].c, dur: t });
    i = 1;
  }
  for (; t < batchH && i < n; i++) {
    const ra = log[i - 1];
    const rb = log[i];
    const b = Math.min(rb.h, batchH);
    if (b > t && rb.h > ra.h) {
      const slope = (rb.c - ra.c) / (rb.h - ra.h);
      const ca = t === ra.h ? ra.c : ra.c + slope * (t - ra.h);
      const cb = b === rb.h ? rb.c : ra.c + slope * (b - ra.h);
      out.push({ c0: ca, c1: cb, dur: b - t });
    }
    if (b > t) t = b;
  }
  if (t < batchH) out.push({ c0: log[n - 1].c, c1: log[n - 1].c, dur: batchH - t });
  return out;
}

/** Lay out a batch for evaluation near ln kd = lnKdC and Ed/R = edRC (K); the enzyme's own values are ignored for those. */
export function compileBatch(rates: Rates, temperature: TemperatureInput, batchH: number, lnKdC: number, edRC: number): CompiledBatch {
  // Rates with ln kd = 0 and Ed = 0 give the Equilibrium Model's offset of ln kd alone.
  const offRates: Rates = { ...rates, lnKdRef: 0, edR: 0 };
  const edRMax = edRC + Math.max(ED_MARGIN * Math.abs(edRC), 10 * KJ_PER_R);
  const slopeK = slopeBoundK({ ...rates, edR: Math.max(rates.eaR, edRMax) });
  const kind: number[] = [];
  const dur: number[] = [];
  const first: number[] = [];
  const u: number[] = [];
  const lnV: number[] = [];
  const lnKOff: number[] = [];
  const node = (invT: number) => {
    u.push(invT - rates.invTRef);
    lnV.push(lnVAt(rates, invT));
    lnKOff.push(lnKAt(offRates, invT));
  };
  const kdMaxAt = (invT: number) => KD_MARGIN * Math.exp(lnKdC + lnKAt(offRates, invT) - edRC * (invT - rates.invTRef));
  for (const p of pieces(temperature, batchH)) {
    if (!(p.dur > 0)) continue;
    if (p.c0 === p.c1) {
      kind.push(1);
      dur.push(p.dur);
      first.push(u.length);
      node(1 / (p.c0 + KELVIN_OFFSET));
      continue;
    }
    const t0 = p.c0 + KELVIN_OFFSET;
    const dT = p.c1 - p.c0;
    const tMin = Math.min(p.c0, p.c1) + KELVIN_OFFSET;
    const slopeLn = (slopeK * Math.abs(dT)) / (tMin * tMin * p.dur);
    let tau = 0;
    while (tau < p.dur) {
      const ta = t0 + (dT * tau) / p.dur;
      const bound = Math.max(slopeLn, kdMaxAt(1 / ta) * E_DELTA);
      let h = p.dur - tau;
      if (bound * h > DELTA) {
        h = DELTA / bound;
        if (p.dur - tau - h < 1e-9 * p.dur) h = p.dur - tau;
      }
      const last = tau + h >= p.dur;
      const tb = last ? t0 + dT : t0 + (dT * (tau + h)) / p.dur;
      const variation = bound * h;
      const rule = variation <= 0.02 ? RULE_3 : variation <= 0.1 ? RULE_4 : RULE_6;
      kind.push(rule.n);
      dur.push(h);
      first.push(u.length);
      for (let j = 0; j < rule.n; j++) node(1 / (ta + (tb - ta) * rule.s[j]));
      if (last) break;
      tau += h;
    }
  }
  let uMin = Infinity;
  let uMax = -Infinity;
  for (const x of u) {
    if (x < uMin) uMin = x;
    if (x > uMax) uMax = x;
  }
  return {
    kind: Uint8Array.from(kind),
    dur: Float64Array.from(dur),
    first: Uint32Array.from(first),
    u: Float64Array.from(u),
    lnV: Float64Array.from(lnV),
    lnKOff: Float64Array.from(lnKOff),
    uMin,
    uMax,
    lnKdC,
    edRC,
    edRMax,
    source: { rates, temperature, batchH },
  };
}

/** Whether theta (ln kd, Ed/R in K) lies in the box the batch's sub-pieces were cut for. */
export function coversTheta(cb: CompiledBatch, lnKd: number, edR: number): boolean {
  if (edR > cb.edRMax) return false;
  const dl = lnKd - cb.lnKdC;
  const de = edR - cb.edRC;
  return dl - de * cb.uMin <= LN_KD_MARGIN && dl - de * cb.uMax <= LN_KD_MARGIN;
}

// (1 - e^-z (1 + z)) / z: series below 0.05, where the closed form cancels.
function g(z: number): number {
  if (z < 0.05) {
    let term = z;
    let sum = 0;
    let fact = 2;
    for (let n = 1; n <= 8; n++) {
      sum += ((n % 2 === 1 ? n : -n) * term) / fact;
      term *= z;
      fact *= n + 2;
    }
    return sum;
  }
  return (-Math.expm1(-z) - z * Math.exp(-z)) / z;
}

/** Work (g/L) and its derivatives at ln kd, Ed/R (K), ln vmaxScale, starting from a fresh batch (activity 1). */
export function workSensitivity(cb: CompiledBatch, lnKd: number, edR: number, lnScale: number): WorkSensitivity {
  const { kind, dur, first, u, lnV, lnKOff } = cb;
  const kk = KK;
  let x = 0;
  let dxk = 0;
  let dxe = 0;
  let a = 1;
  let kInt = 0;
  let mInt = 0;
  for (let s = 0; s < kind.length; s++) {
    const n = kind[s];
    const h = dur[s];
    const o = first[s];
    if (n === 1) {
      const uo = u[o];
      const k = Math.exp(lnKd + lnKOff[o] - edR * uo);
      const z = k * h;
      if (a > 0) {
        const va = Math.exp(lnV[o] + lnScale) * a;
        const phi = z > 1e-300 ? -Math.expm1(-z) / k : h;
        const hg = h * g(z);
        x += va * phi;
        dxk -= va * (kInt * phi + hg);
        dxe += va * (mInt * phi + uo * hg);
        a *= Math.exp(-z);
      }
      kInt += z;
      mInt += z * uo;
      continue;
    }
    if (n === 3) {
      const u0 = u[o], u1 = u[o + 1], u2 = u[o + 2];
      const k0 = Math.exp(lnKd + lnKOff[o] - edR * u0);
      const k1 = Math.exp(lnKd + lnKOff[o + 1] - edR * u1);
      const k2 = Math.exp(lnKd + lnKOff[o + 2] - edR * u2);
      const kEnd = h * (W0 * k0 + W1 * k1 + W2 * k2);
      const mEnd = h * (W0 * k0 * u0 + W1 * k1 * u1 + W2 * k2 * u2);
      if (a > 0) {
        const ku0 = k0 * u0, ku1 = k1 * u1, ku2 = k2 * u2;
        const ki0 = Q00 * k0 + Q01 * k1 + Q02 * k2;
        const ki1 = Q10 * k0 + Q11 * k1 + Q12 * k2;
        const ki2 = Q20 * k0 + Q21 * k1 + Q22 * k2;
        const e0 = W0 * Math.exp(lnV[o] + lnScale - h * ki0);
        const e1 = W1 * Math.exp(lnV[o + 1] + lnScale - h * ki1);
        const e2 = W2 * Math.exp(lnV[o + 2] + lnScale - h * ki2);
        const s0 = e0 + e1 + e2;
        const sk = e0 * ki0 + e1 * ki1 + e2 * ki2;
        const sm =
          e0 * (Q00 * ku0 + Q01 * ku1 + Q02 * ku2) + e1 * (Q10 * ku0 + Q11 * ku1 + Q12 * ku2) + e2 * (Q20 * ku0 + Q21 * ku1 + Q22 * ku2);
        const ah = a * h;
        x += ah * s0;
        dxk -= ah * (kInt * s0 + h * sk);
        dxe += ah * (mInt * s0 + h * sm);
        a *= Math.exp(-kEnd);
      }
      kInt += kEnd;
      mInt += mEnd;
      continue;
    }
    const rule = ruleOf(n);
    const w = rule.w;
    const q = rule.q;
    let kEnd = 0;
    let mEnd = 0;
    for (let j = 0; j < n; j++) {
      const k = Math.exp(lnKd + lnKOff[o + j] - edR * u[o + j]);
      kk[j] = k;
      kEnd += w[j] * k;
      mEnd += w[j] * k * u[o + j];
    }
    kEnd *= h;
    mEnd *= h;
    if (a > 0) {
      let s0 = 0;
      let sk = 0;
      let sm = 0;
      for (let i = 0; i < n; i++) {
        let ki = 0;
        let mi = 0;
        const row = i * n;
        for (let j = 0; j < n; j++) {
          const c = q[row + j] * kk[j];
          ki += c;
          mi += c * u[o + j];
        }
        const e = w[i] * Math.exp(lnV[o + i] + lnScale - h * ki);
        s0 += e;
        sk += e * ki;
        sm += e * mi;
      }
      const ah = a * h;
      x += ah * s0;
      dxk -= ah * (kInt * s0 + h * sk);
      dxe += ah * (mInt * s0 + h * sm);
      a *= Math.exp(-kEnd);
    }
    kInt += kEnd;
    mInt += mEnd;
  }
  return { x, dLnKd: dxk, dEdR: dxe, dLnScale: x };
}
const KK = new Float64Array(8);

/** Product (g/L) and dP/dX from the integrated Michaelis-Menten law: dX/dP = 1 + Km/S, so dP/dX = S/(S + Km). */
export function productAndSlope(x: number, substrate: Substrate): { productGPerL: number; slope: number } {
  const p = productFromWork(x, substrate);
  const s = Math.max(substrate.s0GPerL - p, 0);
  return { productGPerL: p, slope: s / (s + substrate.kmGPerL) };
}

/** Product (g/L) of a fresh batch and its gradient by [ln kdRefPerH, edKJPerMol, ln vmaxScale] at the enzyme's values (scale 1). */
export function productSensitivity(
  enzyme: EnzymeParams,
  substrate: Substrate,
  batchH: number,
  temperature: TemperatureInput,
): ProductSensitivity {
  const rates = compileRates(enzyme);
  const cb = compileBatch(rates, temperature, batchH, rates.lnKdRef, rates.edR);
  const w = workSensitivity(cb, rates.lnKdRef, rates.edR, 0);
  const { productGPerL, slope } = productAndSlope(w.x, substrate);
  return { productGPerL, gradient: [slope * w.dLnKd, slope * w.dEdR * KJ_PER_R, slope * w.dLnScale] };
}
