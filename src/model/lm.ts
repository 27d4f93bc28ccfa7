import { invertSymmetric } from './stats';

export interface LmResult {
  params: number[];
  /** Sum of squared residuals at the solution. */
  ssr: number;
  /** (J^T J)^-1 at the solution; multiply by s^2 for the covariance. Null when singular. */
  jtjInverse: number[][] | null;
  iterations: number;
  converged: boolean;
}

/**
 * A least-squares problem of n residuals in k parameters. `evaluate` writes the residuals at p into r and, when
 * `jac` is given, the Jacobian d r_i / d p_a row by row into jac[i * k + a]; it allocates nothing.
 */
export interface LeastSquaresProblem {
  n: number;
  k: number;
  evaluate(p: Float64Array, r: Float64Array, jac: Float64Array | null): void;
}

/**
 * Levenberg-Marquardt with Marquardt diagonal scaling (Marquardt, J. SIAM 11, 1963, cited from memory): the damped normal equations
 * (J^T J + lambda diag J^T J) step = -J^T r solved by Cholesky; lambda / 10 on an accepted step, x 10 on a rejected
 * one. Stops when the step is below 1e-12 of every parameter, the sum of squares falls by less than 1e-15 of
 * itself, no damping gives a descent, or after maxIter iterations.
 */
export function leastSquares(problem: LeastSquaresProblem, p0: ArrayLike<number>, maxIter = 200): LmResult {
  const { n, k } = problem;
  let p = Float64Array.from(p0);
  let pn = new Float64Array(k);
  let r = new Float64Array(n);
  let rn = new Float64Array(n);
  let jac = new Float64Array(n * k);
  let jacN = new Float64Array(n * k);
  const jtj = new Float64Array(k * k);
  const jtr = new Float64Array(k);
  const aug = new Float64Array(k * k);
  const step = new Float64Array(k);
  problem.evaluate(p, r, jac);
  let ssr = sumSq(r);
  let lambda = 1e-3;
  let converged = false;
  let iter = 0;
  for (; iter < maxIter; iter++) {
    normalEquations(jac, r, n, k, jtj, jtr);
    let improved = false;
    for (let tries = 0; tries < 40; tries++) {
      for (let a = 0; a < k * k; a++) aug[a] = jtj[a];
      for (let a = 0; a < k; a++) aug[a * k + a] = jtj[a * k + a] * (1 + lambda) + 1e-300;
      if (!choleskySolve(aug, jtr, step, k)) {
        lambda *= 10;
        continue;
      }
      for (let a = 0; a < k; a++) pn[a] = p[a] - step[a];
      problem.evaluate(pn, rn, jacN);
      const ssrN = sumSq(rn);
      if (Number.isFinite(ssrN) && ssrN <= ssr) {
        let small = true;
        for (let a = 0; a < k; a++) if (!(Math.abs(step[a]) <= 1e-12 * (Math.abs(p[a]) + 1e-12))) small = false;
        const flat = ssr - ssrN <= 1e-15 * ssr + 1e-300;
        [p, pn] = [pn, p];
        [r, rn] = [rn, r];
        [jac, jacN] = [jacN, jac];
        ssr = ssrN;
        lambda = Math.max(lambda / 10, 1e-12);
        improved = true;
        if (small || flat) converged = true;
        break;
      }
      lambda *= 10;
    }
    if (!improved) {
      converged = true;
      break;
    }
    if (converged) break;
  }
  normalEquations(jac, r, n, k, jtj, jtr);
  const m: number[][] = Array.from({ length: k }, (_, a) => Array.from({ length: k }, (_, b) => jtj[a * k + b]));
  return { params: Array.from(p), ssr, jtjInverse: invertSymmetric(m), iterations: iter, converged };
}

/** Levenberg-Marquardt least squares: residuals(p) and jacobian(p) (rows per point), through `leastSquares`. */
export function levenbergMarquardt(residuals: (p: number[]) => number[], jacobian: (p: number[]) => number[][], p0: number[], maxIter = 200): LmResult {
  const k = p0.length;
  const n = residuals(p0).length;
  return leastSquares(
    {
      n,
      k,
      evaluate(p, r, jac) {
        const pp = Array.from(p);
        const res = residuals(pp);
        for (let i = 0; i < n; i++) r[i] = res[i];
        if (!jac) return;
        const rows = jacobian(pp);
        for (let i = 0; i < n; i++) for (let a = 0; a < k; a++) jac[i * k + a] = rows[i][a];
      },
    },
    p0,
    maxIter,
  );
}

function normalEquations(jac: Float64Array, r: Float64Array, n: number, k: number, jtj: Float64Array, jtr: Float64Array) {
  jtj.fill(0);
  jtr.fill(0);
  for (let i = 0; i < n; i++) {
    const o = i * k;
    const ri = r[i];
    for (let a = 0; a < k; a++) {
      const ja = jac[o + a];
      jtr[a] += ja * ri;
      for (let b = 0; b <= a; b++) jtj[a * k + b] += ja * jac[o + b];
    }
  }
  for (let a = 0; a < k; a++) for (let b = 0; b < a; b++) jtj[b * k + a] = jtj[a * k + b];
}

/** Solve A x = b for symmetric positive definite A (k x k, row-major; overwritten by its Cholesky factor). */
function choleskySolve(a: Float64Array, b: Float64Array, x: Float64Array, k: number): boolean {
  for (let j = 0; j < k; j++) {
    let d = a[j * k + j];
    for (let m = 0; m < j; m++) d -= a[j * k + m] * a[j * k + m];
    if (!(d > 0)) return false;
    const l = Math.sqrt(d);
    a[j * k + j] = l;
    for (let i = j + 1; i < k; i++) {
      let s = a[i * k + j];
      for (let m = 0; m < j; m++) s -= a[i * k + m] * a[j * k + m];
      a[i * k + j] = s / l;
    }
  }
  for (let i = 0; i < k; i++) {
    let s = b[i];
    for (let m = 0; m < i; m++) s -= a[i * k + m] * x[m];
    x[i] = s / a[i * k + i];
  }
  for (let i = k - 1; i >= 0; i--) {
    let s = x[i];
    for (let m = i + 1; m < k; m++) s -= a[m * k + i] * x[m];
    x[i] = s / a[i * k + i];
  }
  for (let i = 0; i < k; i++) if (!Number.isFinite(x[i])) return false;
  return true;
}

function sumSq(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return s;
}
