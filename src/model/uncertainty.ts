import { brentMax, scanMax } from './brent';
import { KELVIN_OFFSET, R } from './constants';
import { ModelCancelledError, ModelInputError } from './errors';
import { compileRates, LN_RATE_CAP, type Rates } from './kinetics';
import { productFromWork } from './batch';
import { isothermalOptimumU, lnWorkIsothermal, optimalSetpointC, workIsothermal } from './optimise';
import { cholesky, createRng, kthSmallest, quantileFromBand, quantilesBySelection, selectRank, type Rng } from './random';
import type { EnzymeParams, Substrate } from './types';

// Local bindings of hot imports: CommonJS transforms (tsx, esbuild) route every call to an imported
// function through a getter, which blocks inlining in the inner loops.
const workFast = workIsothermal;
const lnWorkFast = lnWorkIsothermal;
const productFast = productFromWork;
const optimumU = isothermalOptimumU;
const K0 = KELVIN_OFFSET;
const CAP = LN_RATE_CAP;

export interface UncertaintyInput {
  /** Mean parameters (the fit's point estimates). */
  enzyme: EnzymeParams;
  substrate: Substrate;
  batchH: number;
  boundsC: [number, number];
  /** Covariance of [ln kdRefPerH, edKJPerMol] (2x2) or [ln kdRefPerH, edKJPerMol, eaKJPerMol] (3x3); kJ/mol units. */
  covariance: number[][];
  /** Standard deviation of the reactor's temperature-sensor bias, degC (actual = setpoint + bias). */
  sensorBiasSdC?: number;
  /** Relative standard deviation (sd / mean) of the dose (vmaxRef), drawn log-normal with mean 1. */
  doseRelSd?: number;
  /** Number of draws; default 10000. */
  draws?: number;
  /** PRNG seed; default 1. */
  seed?: number;
  /** Setpoints (degC) at which to report P10/P50/P90; default 11 evenly spaced across boundsC. The robust search scans them and the bounds. */
  candidatesC?: number[];
  /** Also evaluate product at the candidates and find the setpoint with the best P10; default true. */
  robust?: boolean;
}

export interface Percentiles {
  p10: number;
  p50: number;
  p90: number;
}

export interface UncertaintyResult {
  draws: number;
  seed: number;
  /** Draws whose Ed or Ea came out below zero and were clamped. */
  clampedDraws: number;
  nominal: { setpointC: number; productGPerL: number };
  /** Distribution of each draw's own best setpoint, degC (corrected for its sensor bias). */
  optimum: Percentiles & { mean: number };
  /** Product percentiles (g/L) at each candidate setpoint. */
  candidates: (Percentiles & { c: number })[];
  /** Setpoint (degC) whose P10 product is highest, and its product percentiles (g/L); null when robust is false. */
  robust: (Percentiles & { setpointC: number }) | null;
}

export interface ChunkOptions {
  onProgress?: (fraction: number) => void;
  signal?: { cancelled?: boolean; aborted?: boolean };
  /** Draws per chunk; default 1000. */
  chunkSize?: number;
}

interface Draws {
  n: number;
  lnKd: Float64Array;
  edR: Float64Array;
  eaR: Float64Array;
  lnDose: Float64Array;
  /** ln Vmax at tRefC of each draw: the base's plus its ln dose. */
  lnV0: Float64Array;
  bias: Float64Array;
  optimum: Float64Array;
}

function setRates(base: Rates, d: Draws, i: number, out: Rates): void {
  out.lnVRef = base.lnVRef + d.lnDose[i];
  out.eaR = d.eaR[i];
  out.lnKdRef = d.lnKd[i];
  out.edR = d.edR[i];
  out.invTRef = base.invTRef;
  out.hasEq = base.hasEq;
  out.dHeqR = base.dHeqR;
  out.invTeq = base.invTeq;
  out.share = base.share;
  out.lnKd2Ref = base.lnKd2Ref;
  out.ed2R = base.ed2R;
}

/** Most candidates the robust search reports, and most draws x (candidates + searched setpoints) it evaluates. */
export const MAX_CANDIDATES = 101;
export const MAX_EVALUATIONS = 5_000_000;
/** Setpoint evaluations the robust search adds to the candidates and bounds (Brent on the P10 curve, 0.005 degC). */
export const SEARCH_EVALUATIONS = 30;

function percentiles(values: Float64Array, scratch: Float64Array, map: (x: number) => number): Percentiles {
  const [p10, p50, p90] = quantilesBySelection(values, [0.1, 0.5, 0.9], scratch, map);
  return { p10, p50, p90 };
}

interface Sampler {
  base: Rates;
  work: Rates;
  d: Draws;
  rng: Rng;
  chol: number[][];
  dim: number;
  mean: number[];
  biasSd: number;
  doseSd: number;
  batchH: number;
  lo: number;
  hi: number;
  clamped: number;
  /** Equilibrium Model or two fractions: work through workIsothermal on each draw's rates. */
  general: boolean;
}

// Hot loops live outside the generator: engines optimise plain functions better than generator bodies.
function drawRange(sp: Sampler, start: number, end: number): void {
  const { d, rng, chol, dim, mean, base, work, batchH, lo, hi } = sp;
  const z = [0, 0, 0];
  const th = [0, 0, 0];
  for (let i = start; i < end; i++) {
    for (let k = 0; k < dim; k++) z[k] = rng.normal();
    for (let r = 0; r < 3; r++) {
      let s = mean[r];
      if (r < dim) for (let k = 0; k <= r; k++) s += chol[r][k] * z[k];
      th[r] = s;
    }
    let ed = th[1];
    let ea = th[2];
    if (ed < 0 || ea < 0) sp.clamped++;
    if (ed < 0) ed = 0;
    if (ea < 0) ea = 0;
    d.lnKd[i] = th[0];
    d.edR[i] = (ed * 1000) / R;
    d.eaR[i] = (ea * 1000) / R;
    d.bias[i] = sp.biasSd > 0 ? sp.biasSd * rng.normal() : 0;
    d.lnDose[i] = sp.doseSd > 0 ? sp.doseSd * rng.normal() - 0.5 * sp.doseSd * sp.doseSd : 0;
    d.lnV0[i] = base.lnVRef + d.lnDose[i];
    let opt: number;
    if (base.hasEq || base.share > 0) {
      setRates(base, d, i, work);
      const b = d.bias[i];
      opt = scanMax((c) => lnWorkFast(work, c + b, batchH), lo, hi, 21, 1e-6).x;
    } else {
      // Closed form: kd(T*) batch = u*(Ea/Ed); the operator's setpoint is T* - bias.
      let tc: number;
      if (!(ed > ea)) tc = Infinity;
      else if (!(ea > 0)) tc = -Infinity;
      else {
        const u = optimumU(ea / ed);
        const invT = base.invTRef - (Math.log(u / batchH) - d.lnKd[i]) / d.edR[i];
        tc = invT > 0 ? 1 / invT - KELVIN_OFFSET : Infinity;
      }
      opt = tc - d.bias[i];
      if (opt < lo) opt = lo;
      if (opt > hi) opt = hi;
    }
    d.optimum[i] = opt;
  }
}

/**
 * Work (g/L) at setpoint c (degC) of a draw of pure Arrhenius kinetics: ln Vmax and ln kd at tRefC, Ea/R and Ed/R
 * (K), sensor bias (degC). The same arithmetic as workIsothermal on the draw's rates, written out so the loops over
 * draws neither copy rates nor call through.
 */
function arrheniusWork(lnV0: number, lnKd: number, edR: number, eaR: number, bias: number, c: number, invTRef: number, batchH: number): number {
  const dInv = 1 / (c + bias + K0) - invTRef;
  let lnK = lnKd - edR * dInv;
  if (lnK > CAP) lnK = CAP;
  let lnV = lnV0 - eaR * dInv;
  if (lnV > CAP) lnV = CAP;
  const k = Math.exp(lnK);
  const kt = k * batchH;
  return Math.exp(lnV) * (kt > 1e-300 ? -Math.expm1(-kt) / k : batchH);
}

// Work of draw i at setpoint c (degC, before its sensor bias).
function drawWork(sp: Sampler, i: number, c: number): number {
  const d = sp.d;
  if (sp.general) {
    setRates(sp.base, d, i, sp.work);
    return workFast(sp.work, c + d.bias[i], sp.batchH);
  }
  return arrheniusWork(d.lnV0[i], d.lnKd[i], d.edR[i], d.eaR[i], d.bias[i], c, sp.base.invTRef, sp.batchH);
}

/** Work of draws start..end-1 at setpoint c into col: one loop over the typed arrays for pure Arrhenius kinetics. */
function workColumn(sp: Sampler, c: number, col: Float64Array, start = 0, end = sp.d.n): void {
  if (sp.general) {
    for (let i = start; i < end; i++) col[i] = drawWork(sp, i, c);
    return;
  }
  const { lnV0, lnKd, edR, eaR, bias } = sp.d;
  const invTRef = sp.base.invTRef;
  const batchH = sp.batchH;
  for (let i = start; i < end; i++) col[i] = arrheniusWork(lnV0[i], lnKd[i], edR[i], eaR[i], bias[i], c, invTRef, batchH);
}

/**
 * The p-quantile of map(w_i(c)) over n draws, evaluating only the draws that can decide it, from bounds on each
 * draw's w_i(c) given in any increasing transform of w (the same for all): lower[i] <= w_i(c) <= upper[i] there,
 * or upper[i] - width when `lower` is a number (a width the same for every draw). A draw whose upper bound is below
 * the lower bound of the quantile's order statistic lies below it; one whose lower bound is above the upper bound of
 * the next order statistic lies above it. Only the others (the band) are evaluated; the quantile among them,
 * counting those below, is the same number as over all draws (quantilesBySelection).
 */
export function bandQuantile(
  n: number,
  p: number,
  lower: Float64Array | number,
  upper: Float64Array,
  work: (i: number, c: number) => number,
  map: (x: number) => number,
  scratch = new Float64Array(n),
): { at: (c: number) => number; bandSize: number } {
  const i0 = Math.floor((n - 1) * p);
  const i1 = Math.min(n - 1, i0 + 1);
  let lowQ: number;
  let highQ: number;
  if (typeof lower === 'number') {
    const [a, b] = selectRank(upper, i0, true, scratch);
    lowQ = a - lower;
    highQ = i1 > i0 ? b : a;
  } else {
    lowQ = kthSmallest(lower, i0, scratch);
    highQ = kthSmallest(upper, i1, scratch);
  }
  const band: number[] = [];
  let nBelow = 0;
  for (let i = 0; i < n; i++) {
    const l = typeof lower === 'number' ? upper[i] - lower : lower[i];
    if (upper[i] < lowQ) nBelow++;
    else if (!(l > highQ)) band.push(i);
  }
  const idx = Int32Array.from(band);
  const vals = new Float64Array(idx.length);
  return {
    at: (c: number) => {
      for (let j = 0; j < idx.length; j++) vals[j] = work(idx[j], c);
      return quantileFromBand(vals, idx.length, nBelow, n, p, map);
    },
    bandSize: idx.length,
  };
}

/**
 * bandQuantile at any c in [a, b] for w_i unimodal on [a, b] with its maximum at optimum[i] (or outside the
 * bracket): w_i(c) lies between min(w_i(a), w_i(b)) and max(w_i(a), w_i(b)), or w_i(optimum[i]) when that lies inside.
 */
export function bracketQuantile(
  n: number,
  p: number,
  a: number,
  b: number,
  wa: ArrayLike<number>,
  wb: ArrayLike<number>,
  optimum: ArrayLike<number>,
  work: (i: number, c: number) => number,
  map: (x: number) => number,
): { at: (c: number) => number; bandSize: number } {
  const lower = new Float64Array(n);
  const upper = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let l = wa[i];
    let u = wb[i];
    if (l > u) [l, u] = [u, l];
    const o = optimum[i];
    if (o > a && o < b) u = Math.max(u, work(i, o));
    // Margins of 1e-12 cover rounding between the bounds and the same work evaluated at c.
    lower[i] = l - 1e-12 * Math.abs(l);
    upper[i] = u + 1e-12 * Math.abs(u);
  }
  return bandQuantile(n, p, lower, upper, work, map);
}

// Bounds on ln work without its exponentials: ln work = ln V + ln t + G(ln(kd t)), G(u) = ln((1 - e^(-e^u))/e^u)
// falls with u and -1 < G'(u) < 0. G tabulated at u = -40 + m/256 (filled as cells are first used) gives an upper
// bound G(u_m) for u in [u_m, u_m+1) and a lower bound within 1/256 below it; below u = -40, G lies in (-1e-17, 0],
// above 40 it is -u to rounding. LN_MARGIN covers the rounding between the bound and the work computed.
const G_STEPS = 256;
const G_LO = -40;
const G_HI = 40;
const G_TABLE = new Float64Array((G_HI - G_LO) * G_STEPS + 1).fill(NaN);
const LN_MARGIN = 1e-12;
/** Width of a bound interval on ln work: [upper - LN_WIDTH, upper]. */
const LN_WIDTH = 1 / G_STEPS + 2 * LN_MARGIN;

function gAt(m: number): number {
  let g = G_TABLE[m];
  if (g !== g) {
    const u = G_LO + m / G_STEPS;
    g = G_TABLE[m] = Math.log(-Math.expm1(-Math.exp(u))) - u;
  }
  return g;
}

/** Upper bound on ln(arrheniusWork(...)) (the same inputs, ln t for t), within LN_WIDTH of it. */
function lnWorkUpper(lnV0: number, lnKd: number, edR: number, eaR: number, bias: number, c: number, invTRef: number, lnT: number): number {
  const dInv = 1 / (c + bias + K0) - invTRef;
  let lnK = lnKd - edR * dInv;
  if (lnK > CAP) lnK = CAP;
  let lnV = lnV0 - eaR * dInv;
  if (lnV > CAP) lnV = CAP;
  const u = lnK + lnT;
  const g = u < G_LO ? 0 : u >= G_HI ? -u : gAt(Math.floor((u - G_LO) * G_STEPS));
  return lnV + lnT + g + LN_MARGIN;
}

/** Upper bounds on ln work of draws start..end-1 at setpoint c into up; false when one is not a number. */
function lnUpperColumn(sp: Sampler, c: number, up: Float64Array, start = 0, end = sp.d.n): boolean {
  const { lnV0, lnKd, edR, eaR, bias } = sp.d;
  const invTRef = sp.base.invTRef;
  const lnT = Math.log(sp.batchH);
  let ok = true;
  for (let i = start; i < end; i++) {
    const v = lnWorkUpper(lnV0[i], lnKd[i], edR[i], eaR[i], bias[i], c, invTRef, lnT);
    if (v !== v) ok = false;
    up[i] = v;
  }
  return ok;
}

/**
 * Monte Carlo over correlated parameters as a generator: yields progress 0..1 per chunk, returns the result; same
 * seed, same result. `exhaustive` evaluates every draw at every setpoint (the plain reference the tests hold the
 * bounded evaluation to: the same result).
 */
export function* monteCarloSteps(input: UncertaintyInput, chunkSize = 1000, exhaustive = false): Generator<number, UncertaintyResult, void> {
  const { enzyme, substrate, batchH, boundsC } = input;
  const [lo, hi] = boundsC;
  const n = Math.max(1, Math.floor(input.draws ?? 10000));
  const seed = input.seed ?? 1;
  const cov = input.covariance;
  const dim = cov.length;
  if (dim !== 2 && dim !== 3) throw new ModelInputError('covariance', 'must be 2x2 or 3x3');
  const chol = cholesky(cov);
  if (!chol) throw new ModelInputError('covariance', 'must be symmetric positive semi-definite');
  const robust = input.robust ?? true;
  const base = compileRates(enzyme);
  const sp: Sampler = {
    base,
    work: { ...base },
    d: {
      n,
      lnKd: new Float64Array(n),
      edR: new Float64Array(n),
      eaR: new Float64Array(n),
      lnDose: new Float64Array(n),
      lnV0: new Float64Array(n),
      bias: new Float64Array(n),
      optimum: new Float64Array(n),
    },
    rng: createRng(seed),
    chol,
    dim,
    mean: [Math.log(enzyme.kdRefPerH), enzyme.edKJPerMol, enzyme.eaKJPerMol],
    biasSd: input.sensorBiasSdC ?? 0,
    // Log-normal with mean 1 and sd/mean = doseRelSd: sd of ln(dose) = sqrt(ln(1 + doseRelSd^2)).
    doseSd: Math.sqrt(Math.log1p((input.doseRelSd ?? 0) ** 2)),
    batchH,
    lo,
    hi,
    clamped: 0,
    general: base.hasEq || base.share > 0,
  };
  const d = sp.d;
  const chunk = Math.max(1, Math.floor(chunkSize));
  const phase1 = robust ? 0.3 : 1;
  for (let start = 0; start < n; start += chunk) {
    const end = Math.min(n, start + chunk);
    drawRange(sp, start, end);
    yield (phase1 * end) / n;
  }
  const scratch = new Float64Array(n);
  let sum = 0;
  for (let i = 0; i < n; i++) sum += d.optimum[i];
  const optimum = { ...percentiles(d.optimum, scratch, (x) => x), mean: sum / n };
  const nominalC = optimalSetpointC(enzyme, batchH, boundsC);
  const nominal = {
    setpointC: nominalC,
    productGPerL: productFast(workFast(base, nominalC, batchH), substrate),
  };
  if (!robust) {
    return { draws: n, seed, clampedDraws: sp.clamped, nominal, optimum, candidates: [], robust: null };
  }

  const cands =
    input.candidatesC && input.candidatesC.length > 0
      ? [...input.candidatesC].sort((a, b) => a - b)
      : Array.from({ length: 11 }, (_, j) => (j === 10 ? hi : lo + ((hi - lo) * j) / 10));
  if (cands.length > MAX_CANDIDATES) throw new ModelInputError('candidatesC', `must have at most ${MAX_CANDIDATES} setpoints`);
  if (n * (cands.length + 2 + SEARCH_EVALUATIONS) > MAX_EVALUATIONS)
    throw new ModelInputError('draws', `draws x (candidates + ${2 + SEARCH_EVALUATIONS}) must be <= ${MAX_EVALUATIONS}`);
  const m = cands.length;
  // Product rises strictly with work and every draw shares the substrate, so quantiles are taken on work
  // and only the order statistics are turned into product.
  const toProduct = (x: number) => productFast(x, substrate);
  const work = (i: number, c: number) => drawWork(sp, i, c);
  // Pure Arrhenius: a setpoint's column holds upper bounds on each draw's ln work (lnUpperColumn, no
  // exponentials), and each percentile evaluates only the draws whose bounds reach its order statistics
  // (bandQuantile): the same numbers as evaluating every draw. Equilibrium Model and two fractions (or a bound
  // that is not a number): the column holds every draw's work.
  let bounded = !sp.general && !exhaustive;
  const fill = (c: number, col: Float64Array, start = 0, end = n) => {
    if (bounded && lnUpperColumn(sp, c, col, start, end)) return;
    bounded = false;
    workColumn(sp, c, col, start, end);
  };
  const pctOf = (c: number, col: Float64Array): Percentiles =>
    bounded
      ? {
          p10: bandQuantile(n, 0.1, LN_WIDTH, col, work, toProduct, scratch).at(c),
          p50: bandQuantile(n, 0.5, LN_WIDTH, col, work, toProduct, scratch).at(c),
          p90: bandQuantile(n, 0.9, LN_WIDTH, col, work, toProduct, scratch).at(c),
        }
      : percentiles(col, scratch, toProduct);
  const cols: Float64Array[] = cands.map(() => new Float64Array(n));
  const candChunk = Math.max(1, Math.floor(chunk / 4));
  for (let start = 0; start < n; start += candChunk) {
    const end = Math.min(n, start + candChunk);
    for (let j = 0; j < m; j++) fill(cands[j], cols[j], start, end);
    yield phase1 + (0.5 * end) / n;
  }
  // A bound that was not a number switched to whole columns part way: fill them all again.
  if (!bounded && !sp.general && !exhaustive) for (let j = 0; j < m; j++) workColumn(sp, cands[j], cols[j]);
  const candidates = cands.map((c, j) => ({ c, ...pctOf(c, cols[j]) }));

  // The P10 curve over the whole bounds: the candidates and both bounds are its scan, then Brent (common
  // random numbers, so the curve is smooth between scan points) on the bracket around the best of them.
  const scan = cands.map((c, j) => ({ c, pct: candidates[j] as Percentiles, col: cols[j] }));
  const column = (c: number) => {
    const col = new Float64Array(n);
    fill(c, col);
    return { c, pct: pctOf(c, col), col };
  };
  if (cands[0] > lo) scan.unshift(column(lo));
  if (cands[m - 1] < hi) scan.push(column(hi));
  let bestJ = 0;
  for (let j = 1; j < scan.length; j++) if (scan[j].pct.p10 > scan[bestJ].pct.p10) bestJ = j;
  yield phase1 + 0.55;
  let best: { c: number; pct?: Percentiles; p10: number; col: Float64Array } = { ...scan[bestJ], p10: scan[bestJ].pct.p10 };
  const sa = scan[Math.max(0, bestJ - 1)];
  const sb = scan[Math.min(scan.length - 1, bestJ + 1)];
  if (sb.c > sa.c) {
    // Pure Arrhenius: ln work is concave in -1/T (d ln X/d(-1/T) = Ea/R + g(kd t) Ed/R, g = kd t e^(-kd t)/
    // (1 - e^(-kd t)) - 1 falls as kd t rises), so each draw's work is unimodal in c with its maximum at the
    // draw's own optimum: between the bracket's ends it lies above the lower of their lower bounds and below the
    // higher of their upper bounds, or the upper bound at its optimum when that lies inside. Only the draws that
    // can hold the P10 are evaluated. Equilibrium Model and two fractions: every draw at every searched setpoint.
    let p10At: (c: number) => number;
    if (bounded) {
      const lower = new Float64Array(n);
      const upper = new Float64Array(n);
      const { lnV0, lnKd, edR, eaR, bias, optimum: opt } = d;
      const lnT = Math.log(batchH);
      for (let i = 0; i < n; i++) {
        const ua = sa.col[i];
        const ub = sb.col[i];
        lower[i] = Math.min(ua, ub) - LN_WIDTH;
        let u = Math.max(ua, ub);
        const o = opt[i];
        if (o > sa.c && o < sb.c) u = Math.max(u, lnWorkUpper(lnV0[i], lnKd[i], edR[i], eaR[i], bias[i], o, base.invTRef, lnT));
        upper[i] = u;
      }
      p10At = bandQuantile(n, 0.1, lower, upper, work, toProduct, scratch).at;
    } else {
      const col = new Float64Array(n);
      p10At = (c) => (workColumn(sp, c, col), quantilesBySelection(col, [0.1], scratch, toProduct)[0]);
    }
    let evals = 0;
    const res = brentMax((c) => (evals++ < SEARCH_EVALUATIONS ? p10At(c) : -Infinity), sa.c, sb.c, 0.005);
    if (res.fx > best.p10) best = { c: res.x, p10: res.fx, col: new Float64Array(0) };
  }
  const pct = best.pct ?? column(best.c).pct;
  yield phase1 + 0.68;
  const robustRes = { setpointC: best.c, ...pct };
  return { draws: n, seed, clampedDraws: sp.clamped, nominal, optimum, candidates, robust: robustRes };
}

/** Run the Monte Carlo to completion in chunks, reporting progress and honouring cancellation between chunks. */
export function monteCarlo(input: UncertaintyInput, options: ChunkOptions = {}): UncertaintyResult {
  const it = monteCarloSteps(input, options.chunkSize ?? 1000);
  for (;;) {
    if (options.signal && (options.signal.cancelled || options.signal.aborted)) throw new ModelCancelledError();
    const step = it.next();
    if (step.done) {
      options.onProgress?.(1);
      return step.value;
    }
    options.onProgress?.(step.value);
  }
}
