import { KELVIN_OFFSET, R } from './constants';
import { compileRates, lnKAt, lnVAt, slopeBoundK, type Rates } from './kinetics';
import { productFromWork, walkProgram } from './batch';
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
const W0 = RULE_3.w[0],
  W1 = RULE_3.w[1],
  W2 = RULE_3.w[2];
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

/** Product (g/L), its gradient and Hessian by [ln kdRefPerH, edKJPerMol (kJ/mol), ln vmaxScale]. */
export interface ProductSensitivity {
  productGPerL: number;
  gradient: number[];
  hessian: number[][];
}

// Local bindings of hot imports (see batch.ts): tsx routes every imported call through a getter.
const lnVFast = lnVAt;
const lnKFast = lnKAt;

/** Growable node and segment store of one compile. */
class Layout {
  kind = new Uint8Array(256);
  dur = new Float64Array(256);
  first = new Uint32Array(256);
  u = new Float64Array(1024);
  lnV = new Float64Array(1024);
  lnKOff = new Float64Array(1024);
  segs = 0;
  nodes = 0;
  constructor(
    private readonly rates: Rates,
    private readonly offRates: Rates,
  ) {}
  segment(kind: number, dur: number): void {
    if (this.segs === this.kind.length) {
      this.kind = grow(this.kind, new Uint8Array(2 * this.segs));
      this.dur = grow(this.dur, new Float64Array(2 * this.segs));
      this.first = grow(this.first, new Uint32Array(2 * this.segs));
    }
    this.kind[this.segs] = kind;
    this.dur[this.segs] = dur;
    this.first[this.segs++] = this.nodes;
  }
  node(invT: number): void {
    if (this.nodes === this.u.length) {
      this.u = grow(this.u, new Float64Array(2 * this.nodes));
      this.lnV = grow(this.lnV, new Float64Array(2 * this.nodes));
      this.lnKOff = grow(this.lnKOff, new Float64Array(2 * this.nodes));
    }
    const r = this.rates;
    this.u[this.nodes] = invT - r.invTRef;
    this.lnV[this.nodes] = lnVFast(r, invT);
    this.lnKOff[this.nodes++] = r.hasEq ? lnKFast(this.offRates, invT) : 0;
  }
}

function grow<T extends Float64Array | Uint32Array | Uint8Array>(from: T, to: T): T {
  to.set(from);
  return to;
}

/** Lay out a batch for evaluation near ln kd = lnKdC and Ed/R = edRC (K); the enzyme's own values are ignored for those. */
export function compileBatch(rates: Rates, temperature: TemperatureInput, batchH: number, lnKdC: number, edRC: number): CompiledBatch {
  // Rates with ln kd = 0 and Ed = 0 give the Equilibrium Model's offset of ln kd alone.
  const offRates: Rates = { ...rates, lnKdRef: 0, edR: 0 };
  const edRMax = edRC + Math.max(ED_MARGIN * Math.abs(edRC), 10 * KJ_PER_R);
  const slopeK = slopeBoundK({ ...rates, edR: Math.max(rates.eaR, edRMax) });
  const out = new Layout(rates, offRates);
  const invTRef = rates.invTRef;
  const constant = (c: number, dur: number) => {
    if (!(dur > 0)) return;
    out.segment(1, dur);
    out.node(1 / (c + KELVIN_OFFSET));
  };
  // Linear piece c0 -> c1 (degC) over dur hours, cut as batch.ts's advanceRamp cuts it for any theta in the box.
  const ramp = (c0: number, c1: number, dur: number) => {
    if (!(dur > 0)) return;
    if (c0 === c1) return constant(c0, dur);
    const t0 = c0 + KELVIN_OFFSET;
    const dT = c1 - c0;
    const tMin = Math.min(c0, c1) + KELVIN_OFFSET;
    const slopeLn = (slopeK * Math.abs(dT)) / (tMin * tMin * dur);
    let tau = 0;
    while (tau < dur) {
      const ta = t0 + (dT * tau) / dur;
      const invTa = 1 / ta;
      const lnKMax = LN_KD_MARGIN + lnKdC - edRC * (invTa - invTRef) + (rates.hasEq ? lnKFast(offRates, invTa) : 0);
      const bound = Math.max(slopeLn, Math.exp(lnKMax) * E_DELTA);
      let h = dur - tau;
      if (bound * h > DELTA) {
        h = DELTA / bound;
        if (dur - tau - h < 1e-9 * dur) h = dur - tau;
      }
      const last = tau + h >= dur;
      const tb = last ? t0 + dT : t0 + (dT * (tau + h)) / dur;
      const variation = bound * h;
      const rule = variation <= 0.02 ? RULE_3 : variation <= 0.1 ? RULE_4 : RULE_6;
      out.segment(rule.n, h);
      for (let j = 0; j < rule.n; j++) out.node(1 / (ta + (tb - ta) * rule.s[j]));
      if (last) break;
      tau += h;
    }
  };
  // The program from 0 to batchH, in the pieces batch.ts's integrateProgram takes.
  walkProgram(temperature, 0, batchH, constant, ramp);
  let uMin = Infinity;
  let uMax = -Infinity;
  const u = out.u.subarray(0, out.nodes);
  for (let k = 0; k < u.length; k++) {
    if (u[k] < uMin) uMin = u[k];
    if (u[k] > uMax) uMax = u[k];
  }
  return {
    kind: out.kind.subarray(0, out.segs),
    dur: out.dur.subarray(0, out.segs),
    first: out.first.subarray(0, out.segs),
    u,
    lnV: out.lnV.subarray(0, out.nodes),
    lnKOff: out.lnKOff.subarray(0, out.nodes),
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
      const u0 = u[o],
        u1 = u[o + 1],
        u2 = u[o + 2];
      const k0 = Math.exp(lnKd + lnKOff[o] - edR * u0);
      const k1 = Math.exp(lnKd + lnKOff[o + 1] - edR * u1);
      const k2 = Math.exp(lnKd + lnKOff[o + 2] - edR * u2);
      const kEnd = h * (W0 * k0 + W1 * k1 + W2 * k2);
      const mEnd = h * (W0 * k0 * u0 + W1 * k1 * u1 + W2 * k2 * u2);
      if (a > 0) {
        const ku0 = k0 * u0,
          ku1 = k1 * u1,
          ku2 = k2 * u2;
        const ki0 = Q00 * k0 + Q01 * k1 + Q02 * k2;
        const ki1 = Q10 * k0 + Q11 * k1 + Q12 * k2;
        const ki2 = Q20 * k0 + Q21 * k1 + Q22 * k2;
        const e0 = W0 * Math.exp(lnV[o] + lnScale - h * ki0);
        const e1 = W1 * Math.exp(lnV[o + 1] + lnScale - h * ki1);
        const e2 = W2 * Math.exp(lnV[o + 2] + lnScale - h * ki2);
        const s0 = e0 + e1 + e2;
        const sk = e0 * ki0 + e1 * ki1 + e2 * ki2;
        const sm = e0 * (Q00 * ku0 + Q01 * ku1 + Q02 * ku2) + e1 * (Q10 * ku0 + Q11 * ku1 + Q12 * ku2) + e2 * (Q20 * ku0 + Q21 * ku1 + Q22 * ku2);
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

/** Second derivatives of work (g/L) by ln kd and Ed/R (K); those with ln vmaxScale follow from the first (X is linear in it). */
export interface WorkCurvature extends WorkSensitivity {
  dLnKd2: number;
  dLnKdEdR: number;
  dEdR2: number;
}

// J_m / h with J_m = integral over [0, h] of e^(-k t) (k t)^m dt, z = k h, i.e. gamma(m + 1, z) / z: series below 1.
function jm(m: number, z: number): number {
  if (z < 1) {
    let sum = 0;
    let term = 1;
    for (let n = 0; n < 25; n++) {
      sum += term / (n + m + 1);
      term *= -z / (n + 1);
    }
    return sum * z ** m;
  }
  const e = Math.exp(-z);
  return (m === 0 ? -Math.expm1(-z) : m === 1 ? 1 - e * (1 + z) : 2 - e * (2 + z * (2 + z))) / z;
}

/**
 * Work with first and second derivatives, for the Hessian at the posterior mode (one pass, all rules generic).
 * Second order: d2a/d ln kd2 = a (K^2 - K), d2a/d ln kd d(Ed/R) = a M (1 - K), d2a/d(Ed/R)2 = a (M^2 - N),
 * N = integral of kd (1/T - 1/TRef)^2 dt.
 */
export function workCurvature(cb: CompiledBatch, lnKd: number, edR: number, lnScale: number): WorkCurvature {
  const { kind, dur, first, u, lnV, lnKOff } = cb;
  const kk = KK;
  let x = 0;
  let iK = 0;
  let iM = 0;
  let iKK = 0;
  let iKM = 0;
  let iMM = 0;
  let iN = 0;
  let a = 1;
  let bigK = 0;
  let bigM = 0;
  let bigN = 0;
  for (let s = 0; s < kind.length; s++) {
    const n = kind[s];
    const h = dur[s];
    const o = first[s];
    if (n === 1) {
      const uo = u[o];
      const k = Math.exp(lnKd + lnKOff[o] - edR * uo);
      const z = k * h;
      if (a > 0) {
        const va = Math.exp(lnV[o] + lnScale) * a * h;
        const j0 = jm(0, z);
        const j1 = jm(1, z);
        const j2 = jm(2, z);
        x += va * j0;
        iK += va * (bigK * j0 + j1);
        iM += va * (bigM * j0 + uo * j1);
        iKK += va * (bigK * bigK * j0 + 2 * bigK * j1 + j2);
        iKM += va * (bigK * bigM * j0 + (bigK * uo + bigM) * j1 + uo * j2);
        iMM += va * (bigM * bigM * j0 + 2 * bigM * uo * j1 + uo * uo * j2);
        iN += va * (bigN * j0 + uo * uo * j1);
        a *= Math.exp(-z);
      }
      bigK += z;
      bigM += z * uo;
      bigN += z * uo * uo;
      continue;
    }
    const rule = ruleOf(n);
    const w = rule.w;
    const q = rule.q;
    let kEnd = 0;
    let mEnd = 0;
    let nEnd = 0;
    for (let j = 0; j < n; j++) {
      const k = Math.exp(lnKd + lnKOff[o + j] - edR * u[o + j]);
      kk[j] = k;
      kEnd += w[j] * k;
      mEnd += w[j] * k * u[o + j];
      nEnd += w[j] * k * u[o + j] * u[o + j];
    }
    if (a > 0) {
      const ah = a * h;
      for (let i = 0; i < n; i++) {
        let ki = 0;
        let mi = 0;
        let ni = 0;
        const row = i * n;
        for (let j = 0; j < n; j++) {
          const c = q[row + j] * kk[j];
          const uj = u[o + j];
          ki += c;
          mi += c * uj;
          ni += c * uj * uj;
        }
        const e = ah * w[i] * Math.exp(lnV[o + i] + lnScale - h * ki);
        const kI = bigK + h * ki;
        const mI = bigM + h * mi;
        x += e;
        iK += e * kI;
        iM += e * mI;
        iKK += e * kI * kI;
        iKM += e * kI * mI;
        iMM += e * mI * mI;
        iN += e * (bigN + h * ni);
      }
      a *= Math.exp(-h * kEnd);
    }
    bigK += h * kEnd;
    bigM += h * mEnd;
    bigN += h * nEnd;
  }
  return { x, dLnKd: -iK, dEdR: iM, dLnScale: x, dLnKd2: iKK - iK, dLnKdEdR: iM - iKM, dEdR2: iMM - iN };
}

/** Product (g/L), dP/dX and d2P/dX2 (L/g) from the integrated Michaelis-Menten law: dX/dP = 1 + Km/S, so dP/dX = S/(S + Km). */
export function productAndSlope(x: number, substrate: Substrate): { productGPerL: number; slope: number; curvature: number } {
  const km = substrate.kmGPerL;
  const p = productFromWork(x, substrate);
  const s = Math.max(substrate.s0GPerL - p, 0);
  return { productGPerL: p, slope: s / (s + km), curvature: (-km * s) / (s + km) ** 3 };
}

/** Gradient and Hessian of product by theta = [ln kdRefPerH, edKJPerMol, ln vmaxScale] from work's (kJ/mol units). */
export function productDerivatives(w: WorkCurvature, substrate: Substrate): { productGPerL: number; gradient: number[]; hessian: number[][] } {
  const { productGPerL, slope, curvature } = productAndSlope(w.x, substrate);
  const dx = [w.dLnKd, w.dEdR * KJ_PER_R, w.x];
  const ddx = [
    [w.dLnKd2, w.dLnKdEdR * KJ_PER_R, w.dLnKd],
    [w.dLnKdEdR * KJ_PER_R, w.dEdR2 * KJ_PER_R * KJ_PER_R, w.dEdR * KJ_PER_R],
    [w.dLnKd, w.dEdR * KJ_PER_R, w.x],
  ];
  return {
    productGPerL,
    gradient: dx.map((d) => slope * d),
    hessian: ddx.map((row, i) => row.map((v, k) => curvature * dx[i] * dx[k] + slope * v)),
  };
}

/** Product (g/L) of a fresh batch, its gradient and Hessian by [ln kdRefPerH, edKJPerMol, ln vmaxScale] at the enzyme's values (scale 1). */
export function productSensitivity(enzyme: EnzymeParams, substrate: Substrate, batchH: number, temperature: TemperatureInput): ProductSensitivity {
  const rates = compileRates(enzyme);
  const cb = compileBatch(rates, temperature, batchH, rates.lnKdRef, rates.edR);
  return productDerivatives(workCurvature(cb, rates.lnKdRef, rates.edR, 0), substrate);
}
