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

/** Levenberg-Marquardt least squares: residuals(p) and jacobian(p) (rows per point); Marquardt diagonal scaling. */
export function levenbergMarquardt(
  residuals: (p: number[]) => number[],
  jacobian: (p: number[]) => number[][],
  p0: number[],
  maxIter = 200,
): LmResult {
  const k = p0.length;
  let p = [...p0];
  let r = residuals(p);
  let ssr = sumSq(r);
  let lambda = 1e-3;
  let converged = false;
  let iter = 0;
  for (; iter < maxIter; iter++) {
    const j = jacobian(p);
    const jtj: number[][] = Array.from({ length: k }, () => new Array(k).fill(0));
    const jtr = new Array(k).fill(0);
    for (let i = 0; i < r.length; i++) {
      const row = j[i];
      for (let a = 0; a < k; a++) {
        jtr[a] += row[a] * r[i];
        for (let b = 0; b <= a; b++) jtj[a][b] += row[a] * row[b];
      }
    }
    for (let a = 0; a < k; a++) for (let b = 0; b < a; b++) jtj[b][a] = jtj[a][b];
    let improved = false;
    for (let tries = 0; tries < 40; tries++) {
      const aug = jtj.map((row, a) => row.map((v, b) => (a === b ? v * (1 + lambda) + 1e-300 : v)));
      const inv = invertSymmetric(aug);
      if (!inv) {
        lambda *= 10;
        continue;
      }
      const step = inv.map((row) => -row.reduce((s, v, b) => s + v * jtr[b], 0));
      const pn = p.map((v, a) => v + step[a]);
      const rn = residuals(pn);
      const ssrN = sumSq(rn);
      if (Number.isFinite(ssrN) && ssrN <= ssr) {
        const small = step.every((s, a) => Math.abs(s) <= 1e-12 * (Math.abs(p[a]) + 1e-12));
        const flat = ssr - ssrN <= 1e-15 * ssr + 1e-300;
        p = pn;
        r = rn;
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
  const j = jacobian(p);
  const jtj: number[][] = Array.from({ length: k }, () => new Array(k).fill(0));
  for (const row of j) for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) jtj[a][b] += row[a] * row[b];
  return { params: p, ssr, jtjInverse: invertSymmetric(jtj), iterations: iter, converged };
}

function sumSq(r: number[]): number {
  let s = 0;
  for (const v of r) s += v * v;
  return s;
}
