import { brentMax, scanMax } from './brent';
import { KELVIN_OFFSET, R } from './constants';
import { ModelCancelledError, ModelInputError } from './errors';
import { compileRates, LN_RATE_CAP, type Rates } from './kinetics';
import { productFromWork } from './batch';
import { isothermalOptimumU, lnWorkIsothermal, optimalSetpointC, workIsothermal } from './optimise';
import { cholesky, createRng, kthSmallest, quantileFromBand, quantilesBySelection, type Rng } from './random';
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

// Work of draw i at setpoint c (degC, before its sensor bias): the same arithmetic as workIsothermal on the draw's
// rates, written out for pure Arrhenius kinetics so the loops over draws neither copy rates nor call through.
function drawWork(sp: Sampler, i: number, c: number): number {
  const { d, base, batchH } = sp;
  if (sp.general) {
    setRates(base, d, i, sp.work);
    return workFast(sp.work, c + d.bias[i], batchH);
  }
  const dInv = 1 / (c + d.bias[i] + K0) - base.invTRef;
  let lnK = d.lnKd[i] - d.edR[i] * dInv;
  if (lnK > CAP) lnK = CAP;
  let lnV = base.lnVRef + d.lnDose[i] - d.eaR[i] * dInv;
  if (lnV > CAP) lnV = CAP;
  const k = Math.exp(lnK);
  const kt = k * batchH;
  return Math.exp(lnV) * (kt > 1e-300 ? -Math.expm1(-kt) / k : batchH);
}

function workRange(sp: Sampler, cands: number[], out: Float64Array[], start: number, end: number): void {
  const m = cands.length;
  for (let i = start; i < end; i++) for (let j = 0; j < m; j++) out[j][i] = drawWork(sp, i, cands[j]);
}

function workColumn(sp: Sampler, c: number, col: Float64Array): void {
  for (let i = 0; i < sp.d.n; i++) col[i] = drawWork(sp, i, c);
}

/**
 * The p-quantile of map(w_i(c)) over n draws at any c in [a, b], evaluating only the draws that can decide it. Each
 * w_i must be unimodal on [a, b] with its maximum at optimum[i] (or outside the bracket): then w_i(c) lies between
 * min(w_i(a), w_i(b)) and max(w_i(a), w_i(b)), or w_i(optimum[i]) when that lies inside. A draw whose upper bound
 * is below the lower bound of the quantile's order statistic lies below it at every c; one whose lower bound is
 * above the upper bound of the next order statistic lies above it. Only the others (the band) are evaluated; the
 * quantile among them, counting those below, is the same number as over all draws (quantilesBySelection).
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
  const i0 = Math.floor((n - 1) * p);
  const i1 = Math.min(n - 1, i0 + 1);
  const scratch = new Float64Array(n);
  const lowQ = kthSmallest(lower, i0, scratch);
  const highQ = kthSmallest(upper, i1, scratch);
  const band: number[] = [];
  let nBelow = 0;
  for (let i = 0; i < n; i++) {
    if (upper[i] < lowQ) nBelow++;
    else if (!(lower[i] > highQ)) band.push(i);
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

/** Monte Carlo over correlated parameters as a generator: yields progress 0..1 per chunk, returns the result; same seed, same result. */
export function* monteCarloSteps(input: UncertaintyInput, chunkSize = 1000): Generator<number, UncertaintyResult, void> {
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
  const works: Float64Array[] = cands.map(() => new Float64Array(n));
  const candChunk = Math.max(1, Math.floor(chunk / 4));
  for (let start = 0; start < n; start += candChunk) {
    const end = Math.min(n, start + candChunk);
    workRange(sp, cands, works, start, end);
    yield phase1 + (0.5 * end) / n;
  }
  const candidates = cands.map((c, j) => ({ c, ...percentiles(works[j], scratch, toProduct) }));

  // The P10 curve over the whole bounds: the candidates and both bounds are its scan, then Brent (common
  // random numbers, so the curve is smooth between scan points) on the bracket around the best of them.
  const col = new Float64Array(n);
  const p10Of = (w: Float64Array) => quantilesBySelection(w, [0.1], scratch, toProduct)[0];
  const scan = cands.map((c, j) => ({ c, p10: candidates[j].p10, w: works[j] }));
  if (cands[0] > lo) {
    const w = new Float64Array(n);
    workColumn(sp, lo, w);
    scan.unshift({ c: lo, p10: p10Of(w), w });
  }
  if (cands[m - 1] < hi) {
    const w = new Float64Array(n);
    workColumn(sp, hi, w);
    scan.push({ c: hi, p10: p10Of(w), w });
  }
  let bestJ = 0;
  for (let j = 1; j < scan.length; j++) if (scan[j].p10 > scan[bestJ].p10) bestJ = j;
  yield phase1 + 0.55;
  let bestC = scan[bestJ].c;
  let bestP = scan[bestJ].p10;
  const sa = scan[Math.max(0, bestJ - 1)];
  const sb = scan[Math.min(scan.length - 1, bestJ + 1)];
  if (sb.c > sa.c) {
    // Pure Arrhenius: ln work is concave in -1/T (d ln X/d(-1/T) = Ea/R + g(kd t) Ed/R, g = kd t e^(-kd t)/
    // (1 - e^(-kd t)) - 1 falls as kd t rises), so each draw's work is unimodal in c with its maximum at the
    // draw's own optimum, and only the draws that can hold the P10 are evaluated (exact: bracketQuantile).
    // Equilibrium Model and two fractions: every draw at every searched setpoint.
    const p10At = sp.general
      ? (c: number) => (workColumn(sp, c, col), p10Of(col))
      : bracketQuantile(n, 0.1, sa.c, sb.c, sa.w, sb.w, d.optimum, (i, c) => drawWork(sp, i, c), toProduct).at;
    let evals = 0;
    const res = brentMax((c) => (evals++ < SEARCH_EVALUATIONS ? p10At(c) : -Infinity), sa.c, sb.c, 0.005);
    if (res.fx > bestP) {
      bestP = res.fx;
      bestC = res.x;
    }
  }
  yield phase1 + 0.68;
  workColumn(sp, bestC, col);
  const robustRes = { setpointC: bestC, ...percentiles(col, scratch, toProduct) };
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
