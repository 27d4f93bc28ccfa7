// Calibration from closed plant batches: the posterior of theta = [ln kdRefPerH, edKJPerMol, ln vmaxScale] given
// each batch's measured product, by the Laplace approximation (mode by Gauss-Newton on the engine with exact
// forward-mode derivatives; covariance = inverse Hessian at the mode), as for near-Gaussian posteriors in
// Gelman et al., Bayesian Data Analysis, 3rd ed., ch. 4 and 13. Leave-one-out predictive checks follow ch. 7.
import { R } from './constants';
import { ModelInputError } from './errors';
import { compileRates, type Rates } from './kinetics';
import { cholesky } from './random';
import { gaussHermite } from './quadrature';
import { compileBatch, coversTheta, productAndSlope, productDerivatives, workCurvature, workSensitivity, type CompiledBatch } from './sensitivity';
import { invertSymmetric } from './stats';
import type { EnzymeParams, Substrate, TemperatureInput } from './types';

/** A closed batch: its length (h), logged or planned temperatures, measured product and its sd (g/L). */
export interface CalibrationBatch {
  batchH: number;
  temperature: TemperatureInput;
  measuredProductGPerL: number;
  measurementSdGPerL: number;
}

export interface CalibrationInput {
  /** Prior means: kdRefPerH and edKJPerMol of the lot; vmaxRef is the recipe's rate at scale 1. */
  enzyme: EnzymeParams;
  substrate: Substrate;
  /** Prior covariance of [ln kdRefPerH, edKJPerMol, ln vmaxScale] (kJ/mol units), positive definite. */
  covariance: number[][];
  batches: CalibrationBatch[];
}

export interface CalibratedBatch {
  /** Model at the prior means (a plain simulate), g/L, and its sd under the prior (linearised), g/L. */
  priorForecastGPerL: number;
  priorSdGPerL: number;
  /** Model at the posterior values, g/L. */
  posteriorForecastGPerL: number;
  /** Forecast from all the other batches (outliers left out) and its sd without the measurement noise, g/L. */
  leaveOneOutForecastGPerL: number;
  leaveOneOutSdGPerL: number;
  /** (measured - leave-one-out forecast) / sqrt(measurementSd^2 + leave-one-out variance). */
  standardisedResidual: number;
  /** |standardisedResidual| above OUTLIER_LIMIT, found worst first with earlier outliers left out. */
  outlier: boolean;
}

export interface CalibrationResult {
  posterior: {
    /** exp(posterior mean of ln kd), 1/h; posterior mean of Ed, kJ/mol; exp(posterior mean of ln scale). */
    kdRefPerH: number;
    edKJPerMol: number;
    vmaxScale: number;
    /** Posterior covariance of [ln kdRefPerH, edKJPerMol, ln vmaxScale], kJ/mol units. */
    covariance: number[][];
  };
  batches: CalibratedBatch[];
  /** Gauss-Newton iterations of the posterior over all batches, and whether it met its tolerance. */
  iterations: number;
  converged: boolean;
}

/** Standardised residual beyond which a batch is flagged as an outlier (dimensionless). */
export const OUTLIER_LIMIT = 3;

const KJ_PER_R = 1000 / R;
type Vec3 = [number, number, number];

interface Evaluation {
  /** Forecast product (g/L), its gradient and (on request) Hessian by theta, per batch. */
  f: number[];
  j: Vec3[];
  h?: number[][][];
}

interface Solution {
  theta: Vec3;
  ev: Evaluation;
  hessian: number[][];
  iterations: number;
  converged: boolean;
}

class Model {
  private compiled: CompiledBatch[];
  constructor(
    private readonly rates: Rates,
    private readonly substrate: Substrate,
    private readonly batches: CalibrationBatch[],
    theta: Vec3,
  ) {
    this.compiled = batches.map((b) => compileBatch(rates, b.temperature, b.batchH, theta[0], theta[1] * KJ_PER_R));
  }

  evaluate(theta: Vec3, second = false): Evaluation {
    const f: number[] = [];
    const j: Vec3[] = [];
    const h: number[][][] = [];
    const lnKd = theta[0];
    const edR = theta[1] * KJ_PER_R;
    for (let i = 0; i < this.compiled.length; i++) {
      if (!coversTheta(this.compiled[i], lnKd, edR)) {
        const b = this.batches[i];
        this.compiled[i] = compileBatch(this.rates, b.temperature, b.batchH, lnKd, edR);
      }
      if (second) {
        const d = productDerivatives(workCurvature(this.compiled[i], lnKd, edR, theta[2]), this.substrate);
        f.push(d.productGPerL);
        j.push(d.gradient as Vec3);
        h.push(d.hessian);
        continue;
      }
      const w = workSensitivity(this.compiled[i], lnKd, edR, theta[2]);
      const { productGPerL, slope } = productAndSlope(w.x, this.substrate);
      f.push(productGPerL);
      j.push([slope * w.dLnKd, slope * w.dEdR * KJ_PER_R, slope * w.dLnScale]);
    }
    return second ? { f, j, h } : { f, j };
  }
}

function quad(a: number[][], x: readonly number[], y: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < 3; i++) for (let k = 0; k < 3; k++) s += x[i] * a[i][k] * y[k];
  return s;
}

function invert(a: number[][], what: string): number[][] {
  const inv = invertSymmetric(a);
  if (!inv) throw new ModelInputError('covariance', `gives a singular ${what}`);
  return inv;
}

/** Posterior mode over the active batches by Gauss-Newton with step halving; Hessian = P0 + sum J^T J / sd^2. */
function solve(model: Model, batches: CalibrationBatch[], active: boolean[], mean: Vec3, precision: number[][], start: Vec3, startEv?: Evaluation): Solution {
  const objective = (theta: Vec3, ev: Evaluation) => {
    const d = [theta[0] - mean[0], theta[1] - mean[1], theta[2] - mean[2]];
    let s = 0.5 * quad(precision, d, d);
    for (let i = 0; i < batches.length; i++) {
      if (!active[i]) continue;
      const r = (batches[i].measuredProductGPerL - ev.f[i]) / batches[i].measurementSdGPerL;
      s += 0.5 * r * r;
    }
    return s;
  };
  let theta: Vec3 = [...start];
  let ev = startEv ?? model.evaluate(theta);
  let phi = objective(theta, ev);
  let iterations = 0;
  let converged = false;
  let hessian = precision;
  for (; iterations < 100; iterations++) {
    const h = precision.map((row) => [...row]);
    const d = [theta[0] - mean[0], theta[1] - mean[1], theta[2] - mean[2]];
    const g = [0, 1, 2].map((a) => precision[a][0] * d[0] + precision[a][1] * d[1] + precision[a][2] * d[2]);
    for (let i = 0; i < batches.length; i++) {
      if (!active[i]) continue;
      const sd2 = batches[i].measurementSdGPerL ** 2;
      const ji = ev.j[i];
      const r = batches[i].measuredProductGPerL - ev.f[i];
      for (let a = 0; a < 3; a++) {
        g[a] -= (ji[a] * r) / sd2;
        for (let b = 0; b < 3; b++) h[a][b] += (ji[a] * ji[b]) / sd2;
      }
    }
    hessian = h;
    const hInv = invert(h, 'posterior');
    const step = [0, 1, 2].map((a) => -(hInv[a][0] * g[0] + hInv[a][1] * g[1] + hInv[a][2] * g[2]));
    // Newton decrement: the step's length in posterior standard deviations, squared; 1e-8 leaves the mode
    // within 1e-4 sd (the iteration converges linearly, by a factor of about 300 per step in the benchmark).
    const decrement = -(g[0] * step[0] + g[1] * step[1] + g[2] * step[2]);
    if (!(decrement > 1e-8)) {
      converged = true;
      break;
    }
    let t = 1;
    let accepted = false;
    for (let tries = 0; tries < 30; tries++, t *= 0.5) {
      const next: Vec3 = [theta[0] + t * step[0], theta[1] + t * step[1], theta[2] + t * step[2]];
      const evN = model.evaluate(next);
      const phiN = objective(next, evN);
      if (phiN <= phi + 1e-14 * Math.abs(phi)) {
        theta = next;
        ev = evN;
        phi = phiN;
        accepted = true;
        break;
      }
    }
    if (!accepted) break;
  }
  return { theta, ev, hessian, iterations, converged };
}

// 7 points a side: exact for polynomials to degree 13 against the normal base, outer nodes at 3.75 sd.
const HERMITE = gaussHermite(7);

/**
 * Posterior mean and covariance beyond the Laplace mode: importance weights of the normal at the mode (exact
 * Hessian) on a 7^3 Gauss-Hermite grid, each batch's forecast expanded to second order about the mode. The
 * mode is not the mean where a batch's product curves in theta over a posterior sd (few batches, wide prior).
 */
function posteriorMoments(
  batches: CalibrationBatch[],
  mean0: Vec3,
  precision: number[][],
  sol: Solution,
  ev2: Evaluation,
): { mean: Vec3; covariance: number[][] } {
  const h = precision.map((row) => [...row]);
  for (let i = 0; i < batches.length; i++) {
    const sd2 = batches[i].measurementSdGPerL ** 2;
    const r = batches[i].measuredProductGPerL - ev2.f[i];
    for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) h[a][b] += (ev2.j[i][a] * ev2.j[i][b] - r * ev2.h![i][a][b]) / sd2;
  }
  // Far from the data's fit the exact Hessian may not be positive definite: keep the Gauss-Newton one then.
  const exact = invertSymmetric(h);
  const base = exact && cholesky(exact)?.every((row, i) => row[i] > 0) ? exact : invert(sol.hessian, 'posterior');
  const l = cholesky(base)!;
  const theta = sol.theta;
  const phi = (d: number[]) => {
    const p = [theta[0] + d[0] - mean0[0], theta[1] + d[1] - mean0[1], theta[2] + d[2] - mean0[2]];
    let s = 0.5 * quad(precision, p, p);
    for (let i = 0; i < batches.length; i++) {
      const ji = ev2.j[i];
      const f = ev2.f[i] + ji[0] * d[0] + ji[1] * d[1] + ji[2] * d[2] + 0.5 * quad(ev2.h![i], d, d);
      const r = (batches[i].measuredProductGPerL - f) / batches[i].measurementSdGPerL;
      s += 0.5 * r * r;
    }
    return s;
  };
  const phi0 = phi([0, 0, 0]);
  const { x, w } = HERMITE;
  const pts: number[][] = [];
  const logW: number[] = [];
  for (let a = 0; a < x.length; a++)
    for (let b = 0; b < x.length; b++)
      for (let c = 0; c < x.length; c++) {
        const z = [x[a], x[b], x[c]];
        const d = [0, 1, 2].map((i) => l[i][0] * z[0] + l[i][1] * z[1] + l[i][2] * z[2]);
        pts.push(d);
        logW.push(Math.log(w[a] * w[b] * w[c]) - (phi(d) - phi0) + 0.5 * (z[0] * z[0] + z[1] * z[1] + z[2] * z[2]));
      }
  const top = Math.max(...logW);
  let total = 0;
  const m = [0, 0, 0];
  const c2 = [0, 1, 2].map(() => [0, 0, 0]);
  pts.forEach((d, k) => {
    const wk = Math.exp(logW[k] - top);
    total += wk;
    for (let i = 0; i < 3; i++) {
      m[i] += wk * d[i];
      for (let j = 0; j < 3; j++) c2[i][j] += wk * d[i] * d[j];
    }
  });
  const dm = m.map((v) => v / total);
  return {
    mean: [theta[0] + dm[0], theta[1] + dm[1], theta[2] + dm[2]],
    covariance: c2.map((row, i) => row.map((v, j) => v / total - dm[i] * dm[j])),
  };
}

interface LooBatch {
  forecast: number;
  variance: number;
  z: number;
}

/** Leave-one-out predictive check at a Laplace solution over the active batches; inactive batches are predicted from it. */
function leaveOneOut(batches: CalibrationBatch[], active: boolean[], sol: Solution): LooBatch[] {
  const cov = invert(sol.hessian, 'posterior');
  return batches.map((b, i) => {
    const ji = sol.ev.j[i];
    const v = Math.max(quad(cov, ji, ji), 0);
    const sd2 = b.measurementSdGPerL ** 2;
    const r = b.measuredProductGPerL - sol.ev.f[i];
    if (!active[i]) return { forecast: sol.ev.f[i], variance: v, z: r / Math.sqrt(sd2 + v) };
    // Removing batch i from a Laplace posterior (Sherman-Morrison on the Hessian, one Newton step from the
    // mode): its forecast moves by -r v/(sd^2 - v) and its variance becomes v sd^2/(sd^2 - v).
    const left = Math.max(sd2 - v, 1e-300);
    return { forecast: sol.ev.f[i] - (r * v) / left, variance: (v * sd2) / left, z: r / Math.sqrt(left) };
  });
}

/** Posterior of [ln kdRefPerH, edKJPerMol, ln vmaxScale] from closed batches, with prior, posterior and leave-one-out forecasts (g/L). */
export function calibrate(input: CalibrationInput): CalibrationResult {
  const { enzyme, substrate, covariance, batches } = input;
  const l = cholesky(covariance);
  if (!l || l.some((row, i) => !(row[i] > 0))) throw new ModelInputError('covariance', 'must be positive definite');
  if (!(enzyme.kdRefPerH > 0)) throw new ModelInputError('enzyme.kdRefPerH', 'must be > 0 for the calibrate command');
  // The forward-mode pass covers one decaying fraction and the plain integrated Michaelis-Menten law.
  if (enzyme.stableFraction !== undefined) throw new ModelInputError('enzyme.stableFraction', 'is not yet supported by the calibrate command');
  for (const k of ['kiGPerL', 'ksiGPerL'] as const)
    if (substrate[k] !== undefined) throw new ModelInputError(`substrate.${k}`, 'is not yet supported by the calibrate command');
  const precision = invert(covariance, 'prior');
  const mean: Vec3 = [Math.log(enzyme.kdRefPerH), enzyme.edKJPerMol, 0];
  const model = new Model(compileRates(enzyme), substrate, batches, mean);
  const prior = model.evaluate(mean);
  const all = batches.map(() => true);
  const full = solve(model, batches, all, mean, precision, mean, prior);
  const moments = batches.length ? posteriorMoments(batches, mean, precision, full, model.evaluate(full.theta, true)) : null;
  const post = moments ? moments.mean : full.theta;
  const postForecast = moments ? model.evaluate(post).f : full.ev.f;

  // Flag the worst batch first and judge the others without it, until no batch left in is beyond the limit.
  const active = [...all];
  let sol = full;
  let loo = leaveOneOut(batches, active, sol);
  for (;;) {
    let worst = -1;
    for (let i = 0; i < batches.length; i++)
      if (active[i] && Math.abs(loo[i].z) > OUTLIER_LIMIT && (worst < 0 || Math.abs(loo[i].z) > Math.abs(loo[worst].z))) worst = i;
    if (worst < 0) break;
    active[worst] = false;
    sol = solve(model, batches, active, mean, precision, sol.theta, sol.ev);
    loo = leaveOneOut(batches, active, sol);
  }

  return {
    posterior: {
      kdRefPerH: Math.exp(post[0]),
      edKJPerMol: post[1],
      vmaxScale: Math.exp(post[2]),
      covariance: moments ? moments.covariance : invert(full.hessian, 'posterior'),
    },
    batches: batches.map((_, i) => ({
      priorForecastGPerL: prior.f[i],
      priorSdGPerL: Math.sqrt(Math.max(quad(covariance, prior.j[i], prior.j[i]), 0)),
      posteriorForecastGPerL: postForecast[i],
      leaveOneOutForecastGPerL: loo[i].forecast,
      leaveOneOutSdGPerL: Math.sqrt(loo[i].variance),
      standardisedResidual: loo[i].z,
      outlier: !active[i],
    })),
    iterations: full.iterations,
    converged: full.converged,
  };
}
