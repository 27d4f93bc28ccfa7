import { KELVIN_OFFSET, R } from './constants';
import { ModelInputError } from './errors';
import { softplus } from './kinetics';
import { leastSquares, levenbergMarquardt, type LeastSquaresProblem } from './lm';
import { xOf } from './half-life';
import { incompleteBeta } from './stats';

export interface InactivationPoint {
  /** Hold temperature, degC. */
  c: number;
  /** Time held, h. */
  h: number;
  /** Residual activity, fraction of the activity at h = 0. */
  residual: number;
}

export interface TwoStepEstimate {
  perTemperature: { c: number; kdPerH: number; se: number | null; n: number }[];
  /** Arrhenius-plot estimate; null when fewer than two temperatures decay. */
  kdRefPerH: number | null;
  edKJPerMol: number | null;
}

/** Noise on the readings: relative (multiplicative, least squares on ln residual) or absolute (additive on the fraction). */
export type ErrorModel = 'relative' | 'absolute';

export type InactivationModelName = 'first-order' | 'first-order-a0' | 'two-fraction';

/** One model fitted to the points: parameters, standard errors, covariance of its fitted parameters and AICc. */
export interface InactivationModelFit {
  name: InactivationModelName;
  /** First order at tRefC (two fractions: the labile fraction's), 1/h; Ed in kJ/mol. */
  kdRefPerH: number;
  edKJPerMol: number;
  /** first-order-a0: activity at h = 0 relative to the unheated reference (lost during heat-up when < 1). */
  a0?: number;
  /** two-fraction: the stable fraction. */
  stableFraction?: { share: number; kdRefPerH: number; edKJPerMol: number };
  /** Time to half the activity at h = 0 at tRefC, h (two fractions: of the mixture). */
  halfLifeRefH: number;
  /** Standard errors; empty when the model is singular (they do not exist). */
  se: Record<string, number>;
  /** Covariance of the fitted parameters, in the order of `parameters`; empty when the model is singular. */
  parameters: string[];
  covariance: number[][];
  /** Null when there are too few points for AICc (it needs the parameters + 3). */
  aicc: number | null;
  /** Standard deviation of the residuals (ln residual for the relative model, fraction for the absolute one). */
  residualSd: number;
  dof: number;
  /** Set when the fit is singular or a parameter is not identified; such a model is never chosen. */
  singular?: string;
}

export interface InactivationFit {
  tRefC: number;
  kdRefPerH: number;
  edKJPerMol: number;
  halfLifeRefH: number;
  se: { kdRefPerH: number; edKJPerMol: number; halfLifeRefH: number };
  /** Covariance of [ln kdRefPerH, edKJPerMol] (kJ/mol units) of the chosen model; feed it to the Monte Carlo. */
  covariance: number[][];
  twoStep: TwoStepEstimate;
  /** Standard deviation of the residuals about the chosen model (ln residual when relative, fraction when absolute). */
  residualSd: number;
  n: number;
  dof: number;
  /** The model chosen by AICc: the lowest, then the simplest within 2 of it. */
  chosen: InactivationModelName;
  errorModel: ErrorModel;
  models: InactivationModelFit[];
  /** Models that could not be fitted to these points, and why. */
  unfitted: { name: InactivationModelName; reason: string }[];
  /** Null, or one sentence on how the chosen model misses the data (pure-error F test with replicates, else a runs test). */
  lackOfFit: string | null;
  a0?: number;
  stableFraction?: { share: number; kdRefPerH: number; edKJPerMol: number };
  /** Two fractions chosen: each fraction's own half-life at tRefC, h. */
  fractionHalfLivesRefH?: { labile: number; stable: number };
}

/**
 * Suggested unit of a column of residual activities, for a template's default only: 'percent' when the median
 * is above 1.5. One out-of-range reading never flips a file (it is a bad point in the stated unit); the
 * person states the unit and the fit takes fractions.
 */
export function residualScale(values: number[]): 'fraction' | 'percent' {
  if (values.length === 0) return 'fraction';
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  const median = sorted.length % 2 ? sorted[mid] : 0.5 * (sorted[mid - 1] + sorted[mid]);
  return median > 1.5 ? 'percent' : 'fraction';
}

/** Per-temperature kd (1/h) by least squares through the origin of ln residual vs time, then the Arrhenius plot. */
export function twoStepInactivation(tRefC: number, points: InactivationPoint[]): TwoStepEstimate {
  const groups = new Map<number, InactivationPoint[]>();
  for (const p of points) {
    const g = groups.get(p.c);
    if (g) g.push(p);
    else groups.set(p.c, [p]);
  }
  const perTemperature = [...groups.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([c, pts]) => {
      let stt = 0;
      let sty = 0;
      for (const p of pts) {
        if (!(p.residual > 0)) continue;
        stt += p.h * p.h;
        sty += p.h * Math.log(p.residual);
      }
      const kd = stt > 0 ? -sty / stt : 0;
      let ss = 0;
      for (const p of pts) {
        if (!(p.residual > 0)) continue;
        const e = Math.log(p.residual) + kd * p.h;
        ss += e * e;
      }
      const se = pts.length > 1 && stt > 0 ? Math.sqrt(ss / (pts.length - 1) / stt) : null;
      return { c, kdPerH: kd, se, n: pts.length };
    });
  const pos = perTemperature.filter((t) => t.kdPerH > 0);
  if (pos.length < 2) return { perTemperature, kdRefPerH: null, edKJPerMol: null };
  const xs = pos.map((t) => xOf(t.c, tRefC));
  const ys = pos.map((t) => Math.log(t.kdPerH));
  const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
  const my = ys.reduce((a, b) => a + b, 0) / ys.length;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < xs.length; i++) {
    sxx += (xs[i] - mx) ** 2;
    sxy += (xs[i] - mx) * (ys[i] - my);
  }
  const slope = sxy / sxx;
  return { perTemperature, kdRefPerH: Math.exp(my - slope * mx), edKJPerMol: -slope };
}

/**
 * The points as the least squares sees them: one row per distinct (temperature, time) when replicates are
 * collapsed, with its count as weight and the mean response (ln residual when relative, residual when
 * absolute). The sum of squares over all points is then sum w (mean - m)^2 plus the replicates' own scatter
 * about their means (`ssPe`), a constant, so the minimiser, its covariance s^2 (J^T W J)^-1 with
 * s^2 = SSR / (N - k), and AICc are those of the fit to every point (Seber & Wild, Nonlinear Regression, 1989,
 * ch. 2, weighted least squares with replicates; cited from memory).
 */
interface Prepared {
  xs: Float64Array;
  ts: Float64Array;
  /** Mean response per row: ln residual (relative) or residual (absolute). */
  ys: Float64Array;
  /** sqrt of each row's count. */
  sw: Float64Array;
  /** Rows. */
  n: number;
  /** Points. */
  total: number;
  /** Sum of squares of the points about their rows' means (0 without replicates). */
  ssPe: number;
}

function prepare(points: readonly InactivationPoint[], tRefC: number, errorModel: ErrorModel, collapse: boolean): Prepared {
  const response = (p: InactivationPoint) => (errorModel === 'relative' ? Math.log(p.residual) : p.residual);
  const rowOf = new Map<string, number>();
  const c: number[] = [];
  const h: number[] = [];
  const count: number[] = [];
  const sum: number[] = [];
  const row = new Int32Array(points.length);
  points.forEach((p, i) => {
    const key = `${p.c}|${p.h}`;
    let r = collapse ? rowOf.get(key) : undefined;
    if (r === undefined) {
      r = c.length;
      if (collapse) rowOf.set(key, r);
      c.push(p.c);
      h.push(p.h);
      count.push(0);
      sum.push(0);
    }
    row[i] = r;
    count[r]++;
    sum[r] += response(p);
  });
  const ys = Float64Array.from(sum, (v, r) => v / count[r]);
  let ssPe = 0;
  points.forEach((p, i) => {
    if (count[row[i]] > 1) ssPe += (response(p) - ys[row[i]]) ** 2;
  });
  return {
    xs: Float64Array.from(c, (v) => xOf(v, tRefC)),
    ts: Float64Array.from(h),
    ys,
    sw: Float64Array.from(count, Math.sqrt),
    n: c.length,
    total: points.length,
    ssPe,
  };
}

/** Rows above which a model's several starts race on a subset first (fitInactivation). */
const RACE_ROWS = 2000;
/**
 * Distinct (temperature, time) rows the fit takes: 100,000 (an assay upload's limit) fit all three models in
 * about a second of CPU. Beyond it the fit is refused, naming the limit.
 */
export const MAX_FIT_ROWS = 100_000;

/** Every k-th row of a prepared set (about m rows), with the rows' weights; for racing starts only. */
function subsetOf(p: Prepared, m: number): Prepared {
  const step = p.n / m;
  const idx = Array.from({ length: m }, (_, j) => Math.floor(j * step));
  const pick = (a: Float64Array) => Float64Array.from(idx, (i) => a[i]);
  const sw = pick(p.sw);
  let total = 0;
  for (const w of sw) total += w * w;
  return { xs: pick(p.xs), ts: pick(p.ts), ys: pick(p.ys), sw, n: m, total, ssPe: 0 };
}

// A model's mean residual activity m(theta) at point i and its gradient, written into `grad`.
type MeanFn = (th: ArrayLike<number>, i: number, grad: number[]) => number;

const MEANS: Record<InactivationModelName, { k: number; names: string[]; mean: (p: Prepared) => MeanFn }> = {
  'first-order': {
    k: 2,
    names: ['lnKdRefPerH', 'edKJPerMol'],
    mean: (p) => (th, i, g) => {
      const kt = Math.exp(th[0] - th[1] * p.xs[i]) * p.ts[i];
      const m = Math.exp(-kt);
      g[0] = -m * kt;
      g[1] = m * kt * p.xs[i];
      return m;
    },
  },
  'first-order-a0': {
    k: 3,
    names: ['lnKdRefPerH', 'edKJPerMol', 'lnA0'],
    mean: (p) => (th, i, g) => {
      const kt = Math.exp(th[0] - th[1] * p.xs[i]) * p.ts[i];
      const m = Math.exp(th[2] - kt);
      g[0] = -m * kt;
      g[1] = m * kt * p.xs[i];
      g[2] = m;
      return m;
    },
  },
  'two-fraction': {
    k: 5,
    names: ['lnKdRefPerH', 'edKJPerMol', 'lnStableKdRefPerH', 'stableEdKJPerMol', 'logitShare'],
    mean: (p) => {
      // Rows of one temperature share their rates: kept from the last row while theta and x stay the same.
      let t0 = NaN;
      let t1 = NaN;
      let t2 = NaN;
      let t3 = NaN;
      let t4 = NaN;
      let lastX = NaN;
      let k1 = 0;
      let k2 = 0;
      let sh = 0;
      return (th, i, g) => {
        const x = p.xs[i];
        const t = p.ts[i];
        if (th[4] !== t4) {
          t4 = th[4];
          sh = 1 / (1 + Math.exp(-t4));
        }
        if (x !== lastX || th[0] !== t0 || th[1] !== t1 || th[2] !== t2 || th[3] !== t3) {
          lastX = x;
          t0 = th[0];
          t1 = th[1];
          t2 = th[2];
          t3 = th[3];
          k1 = Math.exp(t0 - t1 * x);
          k2 = Math.exp(t2 - t3 * x);
        }
        const k1t = k1 * t;
        const k2t = k2 * t;
        const e1 = Math.exp(-k1t);
        const e2 = Math.exp(-k2t);
        g[0] = -(1 - sh) * e1 * k1t;
        g[1] = (1 - sh) * e1 * k1t * x;
        g[2] = -sh * e2 * k2t;
        g[3] = sh * e2 * k2t * x;
        g[4] = (e2 - e1) * sh * (1 - sh);
        return (1 - sh) * e1 + sh * e2;
      };
    },
  },
};

interface RawFit {
  th: number[];
  /** Sum of squared residuals over every point (ln scale or fraction scale). */
  ssr: number;
  jtjInverse: number[][] | null;
}

const TWO_FRACTION_MAX_ITER = 50;

function fitModel(p: Prepared, name: InactivationModelName, errorModel: ErrorModel, start: number[]): RawFit {
  const mean = MEANS[name].mean(p);
  const k = MEANS[name].k;
  const g = new Array<number>(k).fill(0);
  const rel = errorModel === 'relative';
  const problem: LeastSquaresProblem = {
    n: p.n,
    k,
    evaluate(th, r, jac) {
      for (let i = 0; i < p.n; i++) {
        const m = mean(th, i, g);
        const w = p.sw[i];
        r[i] = w * (p.ys[i] - (rel ? Math.log(m) : m));
        if (!jac) continue;
        const f = rel ? -w / m : -w;
        for (let a = 0; a < k; a++) jac[i * k + a] = g[a] * f;
      }
    },
  };
  // Two fractions on data that do not separate them creep along a ridge (k2 -> k1 or share -> 0) for hundreds of
  // iterations without changing the AICc; an identified two-fraction fit converges in about ten.
  const lm = leastSquares(problem, start, name === 'two-fraction' ? TWO_FRACTION_MAX_ITER : undefined);
  return { th: lm.params, ssr: lm.ssr + p.ssPe, jtjInverse: lm.jtjInverse };
}

/** Residual of every point at theta (ln scale when relative, fraction scale when absolute), in input order. */
function pointResiduals(points: readonly InactivationPoint[], tRefC: number, name: InactivationModelName, errorModel: ErrorModel, th: number[]): number[] {
  const one: Prepared = { xs: new Float64Array(1), ts: new Float64Array(1), ys: new Float64Array(1), sw: new Float64Array(1), n: 1, total: 1, ssPe: 0 };
  const mean = MEANS[name].mean(one);
  const g = new Array<number>(MEANS[name].k).fill(0);
  return points.map((p) => {
    one.xs[0] = xOf(p.c, tRefC);
    one.ts[0] = p.h;
    const m = mean(th, 0, g);
    return errorModel === 'relative' ? Math.log(p.residual) - Math.log(m) : p.residual - m;
  });
}

/** AICc of a Gaussian least-squares fit with k parameters besides the noise variance (science.md, Definitions). */
function aiccOf(ssr: number, n: number, kFitted: number): number | null {
  const k = kFitted + 1;
  if (n - k - 1 < 1) return null;
  return n * Math.log(Math.max(ssr, 1e-300) / n) + 2 * k + (2 * k * (k + 1)) / (n - k - 1);
}

/** Time (h) at which f1 e^(-k1 t) + f2 e^(-k2 t) falls to half, by bisection on the monotone decay. */
function twoFractionHalfLife(share: number, k1: number, k2: number): number {
  const f = (t: number) => (1 - share) * Math.exp(-k1 * t) + share * Math.exp(-k2 * t) - 0.5;
  let lo = 0;
  let hi = Math.LN2 / Math.max(k1, k2);
  while (f(hi) > 0 && hi < 1e300) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-14 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

function summarise(p: Prepared, name: InactivationModelName, raw: RawFit): InactivationModelFit {
  const k = MEANS[name].k;
  const dof = p.total - k;
  const s2 = raw.ssr / dof;
  const th = raw.th;
  const cov = raw.jtjInverse ? raw.jtjInverse.map((row) => row.map((v) => v * s2)) : th.map(() => th.map(() => NaN));
  const sd = (i: number) => Math.sqrt(cov[i][i]);
  const kd = Math.exp(th[0]);
  const out: InactivationModelFit = {
    name,
    kdRefPerH: kd,
    edKJPerMol: th[1],
    halfLifeRefH: Math.LN2 / kd,
    se: { kdRefPerH: kd * sd(0), edKJPerMol: sd(1), halfLifeRefH: (Math.LN2 / kd) * sd(0) },
    parameters: MEANS[name].names,
    covariance: cov,
    aicc: aiccOf(raw.ssr, p.total, k),
    residualSd: Math.sqrt(s2),
    dof,
  };
  if (name === 'first-order-a0') {
    out.a0 = Math.exp(th[2]);
    out.se.a0 = out.a0 * sd(2);
  }
  if (name === 'two-fraction') {
    const share = 1 / (1 + Math.exp(-th[4]));
    const k2 = Math.exp(th[2]);
    out.stableFraction = { share, kdRefPerH: k2, edKJPerMol: th[3] };
    out.halfLifeRefH = twoFractionHalfLife(share, kd, k2);
    // Delta method on t1/2 by central differences in theta.
    const grad = [0, 2, 4].map((j) => {
      const hStep = 1e-6 * Math.max(1, Math.abs(th[j]));
      const at = (d: number) => {
        const t = [...th];
        t[j] += d;
        return twoFractionHalfLife(1 / (1 + Math.exp(-t[4])), Math.exp(t[0]), Math.exp(t[2]));
      };
      return { j, d: (at(hStep) - at(-hStep)) / (2 * hStep) };
    });
    let v = 0;
    for (const a of grad) for (const b of grad) v += a.d * b.d * cov[a.j][b.j];
    out.se.halfLifeRefH = Math.sqrt(Math.max(0, v));
    out.se.share = share * (1 - share) * sd(4);
    out.se.stableKdRefPerH = k2 * sd(2);
    out.se.stableEdKJPerMol = sd(3);
  }
  const ses = Object.values(out.se);
  if (!raw.jtjInverse || !ses.every(Number.isFinite)) {
    out.singular = 'the fit is singular: its parameters are not identified by these points';
    // No standard errors exist for it: left out rather than given as NaN (every figure printed is a finite number).
    out.se = {};
    out.covariance = [];
  } else if (name === 'two-fraction') {
    const sf = out.stableFraction!;
    if (out.se.share > sf.share || out.se.share > 1 - sf.share || out.se.stableKdRefPerH > 10 * sf.kdRefPerH + 1e-300)
      out.singular = 'ill-conditioned: the data do not separate two fractions (share or stable kd has a standard error above its value)';
  }
  return out;
}

/** Wald-Wolfowitz runs test on residual signs: one-sided p of so few runs (normal approximation). */
function runsTest(signs: number[]): { runs: number; expected: number; p: number } | null {
  const s = signs.filter((v) => v !== 0);
  const n1 = s.filter((v) => v > 0).length;
  const n2 = s.length - n1;
  const n = s.length;
  if (n1 < 2 || n2 < 2) return null;
  let runs = 1;
  for (let i = 1; i < n; i++) if (s[i] !== s[i - 1]) runs++;
  const expected = (2 * n1 * n2) / n + 1;
  const variance = (2 * n1 * n2 * (2 * n1 * n2 - n)) / (n * n * (n - 1));
  const z = (runs - expected) / Math.sqrt(variance);
  return { runs, expected, p: normalCdf(z) };
}

/** Standard normal cumulative distribution (dimensionless). */
function normalCdf(z: number): number {
  // erfc by the Chebyshev fit of Numerical Recipes (erfcc, |error| < 1.2e-7, from memory of the coefficients
  // checked in tests/model/fit.test.ts): ample for a p-value shown to two digits.
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.5 * x);
  const erfc =
    t *
    Math.exp(
      -x * x -
        1.26551223 +
        t *
          (1.00002368 +
            t *
              (0.37409196 +
                t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return z >= 0 ? 1 - 0.5 * erfc : 0.5 * erfc;
}

/** F distribution upper tail P(F > f) with d1, d2 degrees of freedom. */
function fUpperTail(f: number, d1: number, d2: number): number {
  return incompleteBeta(d2 / (d2 + d1 * f), d2 / 2, d1 / 2);
}

function lackOfFitOf(points: readonly InactivationPoint[], res: number[], k: number): string | null {
  const groups = new Map<string, number[]>();
  points.forEach((p, i) => {
    const key = `${p.c}|${p.h}`;
    const g = groups.get(key);
    if (g) g.push(res[i]);
    else groups.set(key, [res[i]]);
  });
  let ssPe = 0;
  let dfPe = 0;
  for (const g of groups.values()) {
    if (g.length < 2) continue;
    const m = g.reduce((a, b) => a + b, 0) / g.length;
    for (const v of g) ssPe += (v - m) ** 2;
    dfPe += g.length - 1;
  }
  const dfLof = groups.size - k;
  if (dfPe > 0 && dfLof > 0 && ssPe > 0) {
    const ssr = res.reduce((a, v) => a + v * v, 0);
    const f = Math.max(0, ssr - ssPe) / dfLof / (ssPe / dfPe);
    const p = fUpperTail(f, dfLof, dfPe);
    if (p >= 0.05) return null;
    return `The model misses the data by more than the replicates' scatter allows (pure-error F test: F = ${f.toPrecision(3)} on ${dfLof} and ${dfPe} degrees of freedom, p = ${p.toPrecision(2)}).`;
  }
  // No replicates: signs of the residuals in temperature then time order.
  const order = points.map((p, i) => i).sort((a, b) => points[a].c - points[b].c || points[a].h - points[b].h);
  const rt = runsTest(order.map((i) => Math.sign(res[i])));
  if (!rt || rt.p >= 0.05) return null;
  return `The residuals run in long stretches of one sign (runs test: ${rt.runs} runs where ${rt.expected.toFixed(1)} are expected, p = ${rt.p.toPrecision(2)}): the model's shape misses the data.`;
}

/** Highest readings the fit accepts (fractions; noisy readings near h = 0 can exceed 1, science.md Definitions). */
const MAX_RESIDUAL = 1.5;

/**
 * Fit residual activity (fractions of the activity at h = 0) at several temperatures with three models on the
 * same points: first order, first order with a free initial activity a0, two fractions. Each by
 * Levenberg-Marquardt with covariance s^2 (J^T J)^-1; the chosen one by AICc (lowest, then the simplest within 2).
 */
export function fitInactivation(
  tRefC: number,
  points: InactivationPoint[],
  options: { errorModel?: ErrorModel; extendedModels?: boolean; collapseReplicates?: boolean } = {},
): InactivationFit {
  const errorModel = options.errorModel ?? 'relative';
  // Replicates (same temperature and time) are fitted as one weighted row: the same fit, far fewer rows for big
  // files; false fits every point as its own row (the test of that equality).
  const collapse = options.collapseReplicates ?? true;
  // false fits first order only: the caller's choice for very large files, where the extended models cost seconds.
  const extended = options.extendedModels ?? true;
  if (!Number.isFinite(tRefC)) throw new ModelInputError('tRefC', 'must be a finite number');
  if (!Array.isArray(points) || points.length < 3) throw new ModelInputError('points', 'needs at least three points');
  const minResidual = errorModel === 'relative' ? 0 : -MAX_RESIDUAL;
  points.forEach((p, i) => {
    if (!Number.isFinite(p.c)) throw new ModelInputError(`points[${i}].c`, 'must be a finite number');
    if (!Number.isFinite(p.h) || p.h < 0) throw new ModelInputError(`points[${i}].h`, 'must be a finite number >= 0');
    if (!Number.isFinite(p.residual) || p.residual <= minResidual || p.residual > MAX_RESIDUAL)
      throw new ModelInputError(
        `points[${i}].residual`,
        errorModel === 'relative'
          ? `must be a fraction > 0 and <= ${MAX_RESIDUAL} (got ${p.residual}${p.residual > MAX_RESIDUAL ? ': per cent? give fractions' : ''})`
          : `must be a fraction > ${minResidual} and <= ${MAX_RESIDUAL} (got ${p.residual}${p.residual > MAX_RESIDUAL ? ': per cent? give fractions' : ''})`,
      );
  });
  const temps = new Set(points.map((p) => p.c));
  if (temps.size < 2) throw new ModelInputError('points', 'needs at least two temperatures');
  const twoStep = twoStepInactivation(tRefC, points);
  if (!twoStep.perTemperature.some((t) => t.kdPerH > 0)) throw new ModelInputError('points', 'shows no decay');

  const n = points.length;
  const prep = prepare(points, tRefC, errorModel, collapse);
  if (prep.n > MAX_FIT_ROWS) throw new ModelInputError('points', `has ${prep.n} distinct (temperature, time) rows: at most ${MAX_FIT_ROWS} are fitted`);
  let start: number[];
  if (twoStep.kdRefPerH !== null && twoStep.edKJPerMol !== null && twoStep.edKJPerMol > 0) start = [Math.log(twoStep.kdRefPerH), twoStep.edKJPerMol];
  else {
    const pos = twoStep.perTemperature.filter((t) => t.kdPerH > 0);
    const mean = pos.reduce((s, t) => s + Math.log(t.kdPerH) + 200 * xOf(t.c, tRefC), 0) / pos.length;
    start = [mean, 200];
  }
  const models: InactivationModelFit[] = [];
  const unfitted: InactivationFit['unfitted'] = [];
  const raws = new Map<InactivationModelName, RawFit>();
  const tryModel = (name: InactivationModelName, starts: number[][]) => {
    const k = MEANS[name].k;
    if (name !== 'first-order' && n - k - 2 < 1) {
      unfitted.push({ name, reason: `needs at least ${k + 3} points` });
      return;
    }
    let best: RawFit | null = null;
    // Many rows and several starts: the starts race on an evenly strided subset of the rows, and only the best
    // of them is fitted to every row (a least-squares fit of all the points either way, from a closer start).
    const race = starts.length > 1 && prep.n > RACE_ROWS ? subsetOf(prep, RACE_ROWS) : null;
    if (race) {
      let lead: RawFit | null = null;
      for (const st of starts) {
        const raw = fitModel(race, name, errorModel, st);
        if (raw.th.every(Number.isFinite) && Number.isFinite(raw.ssr) && (!lead || raw.ssr < lead.ssr)) lead = raw;
      }
      if (lead) starts = [lead.th];
    }
    for (const st of starts) {
      const raw = fitModel(prep, name, errorModel, st);
      if (raw.th.every(Number.isFinite) && Number.isFinite(raw.ssr) && (!best || raw.ssr < best.ssr)) best = raw;
    }
    if (!best) {
      unfitted.push({ name, reason: 'did not converge' });
      return;
    }
    raws.set(name, best);
    models.push(summarise(prep, name, best));
  };
  tryModel('first-order', [start]);
  const fo = raws.get('first-order');
  if (!fo || models[0].singular) throw new ModelInputError('points', 'gives a singular fit');
  if (extended) tryModel('first-order-a0', [[fo.th[0], fo.th[1], 0]]);
  // Two fractions from the first-order fit: a faster labile part and a slower stable one, a few spreads.
  const [l0, e0] = fo.th;
  if (extended)
    tryModel('two-fraction', [
      [l0 + 0.5, e0, l0 - 2.3, e0, -1.5],
      [l0 + 1, e0, l0 - 4, e0, -2.5],
      [l0 + 0.2, e0, l0 - 1, e0, 0],
    ]);
  const tf = models.find((m) => m.name === 'two-fraction');
  if (tf && tf.stableFraction && tf.stableFraction.kdRefPerH > tf.kdRefPerH) {
    // The fractions came out the other way round: the labile one is the faster at tRefC.
    tf.singular ??= 'the fractions swap: the stable fraction decays faster than the labile one at tRefC';
  }

  const eligible = models.filter((m) => !m.singular && m.aicc !== null);
  const minAicc = Math.min(...eligible.map((m) => m.aicc!));
  // Models come simplest first, so the first within 2 of the lowest AICc is the simplest such.
  const chosenFit = eligible.find((m) => m.aicc! <= minAicc + 2) ?? models[0];
  const raw = raws.get(chosenFit.name)!;
  const out: InactivationFit = {
    tRefC,
    kdRefPerH: chosenFit.kdRefPerH,
    edKJPerMol: chosenFit.edKJPerMol,
    halfLifeRefH: chosenFit.halfLifeRefH,
    se: { kdRefPerH: chosenFit.se.kdRefPerH, edKJPerMol: chosenFit.se.edKJPerMol, halfLifeRefH: chosenFit.se.halfLifeRefH },
    covariance: [
      [chosenFit.covariance[0][0], chosenFit.covariance[0][1]],
      [chosenFit.covariance[1][0], chosenFit.covariance[1][1]],
    ],
    twoStep,
    residualSd: chosenFit.residualSd,
    n,
    dof: chosenFit.dof,
    chosen: chosenFit.name,
    errorModel,
    models,
    unfitted,
    lackOfFit: lackOfFitOf(points, pointResiduals(points, tRefC, chosenFit.name, errorModel, raw.th), MEANS[chosenFit.name].k),
  };
  if (chosenFit.a0 !== undefined) out.a0 = chosenFit.a0;
  if (chosenFit.stableFraction) {
    out.stableFraction = chosenFit.stableFraction;
    out.fractionHalfLivesRefH = { labile: Math.LN2 / chosenFit.kdRefPerH, stable: Math.LN2 / chosenFit.stableFraction.kdRefPerH };
  }
  return out;
}

export interface InitialRatePoint {
  /** Assay temperature, degC. */
  c: number;
  /** Initial rate, any positive unit (g/L/h for vmax). */
  rate: number;
}

export interface InitialRateFit {
  model: 'arrhenius' | 'equilibrium';
  eaKJPerMol: number;
  /** Rate at tRefC in the unit of the data (for the Equilibrium Model: before the active-fraction factor). */
  rateRef: number;
  se: { eaKJPerMol: number };
  equilibrium: { teqC: number; dHeqKJPerMol: number; se: { teqC: number; dHeqKJPerMol: number } } | null;
  n: number;
}

function ols(xs: number[], ys: number[]): { a: number; b: number; seB: number; ssr: number } {
  const n = xs.length;
  const mx = xs.reduce((s, v) => s + v, 0) / n;
  const my = ys.reduce((s, v) => s + v, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (xs[i] - mx) ** 2;
    sxy += (xs[i] - mx) * (ys[i] - my);
  }
  const b = sxy / sxx;
  const a = my - b * mx;
  let ssr = 0;
  for (let i = 0; i < n; i++) ssr += (ys[i] - a - b * xs[i]) ** 2;
  const seB = n > 2 ? Math.sqrt(ssr / (n - 2) / sxx) : NaN;
  return { a, b, seB, ssr };
}

/** Ea (kJ/mol) from initial rates vs temperature; the Equilibrium Model too when rates fall past a peak on two or more points. */
export function fitInitialRates(points: InitialRatePoint[], tRefC: number): InitialRateFit {
  if (!Array.isArray(points) || points.length < 3) throw new ModelInputError('points', 'needs at least three points');
  points.forEach((p, i) => {
    if (!Number.isFinite(p.c)) throw new ModelInputError(`points[${i}].c`, 'must be a finite number');
    if (!Number.isFinite(p.rate) || p.rate <= 0) throw new ModelInputError(`points[${i}].rate`, 'must be a number > 0');
  });
  const sorted = [...points].sort((a, b) => a.c - b.c);
  if (new Set(sorted.map((p) => p.c)).size < 2) throw new ModelInputError('points', 'needs at least two temperatures');
  let iMax = 0;
  for (let i = 1; i < sorted.length; i++) if (sorted[i].rate > sorted[iMax].rate) iMax = i;
  const falling = sorted.length - 1 - iMax;
  const rising = sorted.slice(0, iMax + 1);
  const arm = falling >= 2 && rising.length >= 2 ? rising : sorted;
  const lin = ols(
    arm.map((p) => xOf(p.c, tRefC)),
    arm.map((p) => Math.log(p.rate)),
  );
  const arrhenius: InitialRateFit = {
    model: 'arrhenius',
    eaKJPerMol: -lin.b,
    rateRef: Math.exp(lin.a),
    se: { eaKJPerMol: lin.seB },
    equilibrium: null,
    n: arm.length,
  };
  if (falling < 2 || sorted.length < 5 || rising.length < 2) return arrhenius;

  const xs = sorted.map((p) => xOf(p.c, tRefC));
  const ys = sorted.map((p) => Math.log(p.rate));
  const invT = sorted.map((p) => 1 / (p.c + KELVIN_OFFSET));
  // Parameters: ln rateRef, Ea (kJ/mol), Teq (degC), dHeq (kJ/mol).
  const model = (th: number[], i: number) => {
    const lnKeq = ((th[3] * 1000) / R) * (1 / (th[2] + KELVIN_OFFSET) - invT[i]);
    return th[0] - th[1] * xs[i] - softplus(lnKeq);
  };
  const residuals = (th: number[]) => ys.map((y, i) => y - model(th, i));
  const jacobian = (th: number[]) =>
    ys.map((_, i) => {
      const invTeq = 1 / (th[2] + KELVIN_OFFSET);
      const lnKeq = ((th[3] * 1000) / R) * (invTeq - invT[i]);
      const frac = 1 / (1 + Math.exp(-lnKeq));
      // d residual = -d model; d softplus/d lnKeq = Keq/(1+Keq).
      return [-1, xs[i], frac * ((th[3] * 1000) / R) * -(invTeq * invTeq), frac * (1000 / R) * (invTeq - invT[i])];
    });
  const fallArm = sorted.slice(iMax);
  const fall = ols(
    fallArm.map((p) => xOf(p.c, tRefC)),
    fallArm.map((p) => Math.log(p.rate)),
  );
  const ea0 = Math.max(1, -lin.b);
  const dh0 = Math.max(ea0 * 1.5, ea0 + fall.b);
  const start = [lin.a, ea0, sorted[iMax].c, dh0];
  const lm = levenbergMarquardt(residuals, jacobian, start);
  const n = sorted.length;
  if (!lm.jtjInverse || n <= 4 || !lm.params.every(Number.isFinite) || lm.params[3] <= lm.params[1]) return arrhenius;
  const s2 = lm.ssr / (n - 4);
  const se = lm.jtjInverse.map((row, i) => Math.sqrt(row[i] * s2));
  return {
    model: 'equilibrium',
    eaKJPerMol: lm.params[1],
    rateRef: Math.exp(lm.params[0]),
    se: { eaKJPerMol: se[1] },
    equilibrium: { teqC: lm.params[2], dHeqKJPerMol: lm.params[3], se: { teqC: se[2], dHeqKJPerMol: se[3] } },
    n,
  };
}
