import { describe, expect, it } from 'vitest';
import {
  ModelCancelledError,
  ModelInputError,
  cholesky,
  createRng,
  monteCarlo,
  monteCarloSteps,
  optimizeSetpoint,
  quantileSorted,
  quantilesBySelection,
  simulate,
  type UncertaintyInput,
} from '../../src/model';
import { bracketQuantile } from '../../src/model/uncertainty';

const enzyme = { tRefC: 60, vmaxRef: 2, eaKJPerMol: 50, kdRefPerH: Math.LN2, edKJPerMol: 300 };
const substrate = { s0GPerL: 100, kmGPerL: 5 };
// A fit-like covariance of (ln kdRef, Ed kJ/mol): strongly correlated, as Arrhenius fits are.
const covariance = [
  [0.0004, 0.02],
  [0.02, 4],
];
const base: UncertaintyInput = { enzyme, substrate, batchH: 24, boundsC: [40, 60], covariance, draws: 2000, seed: 5 };

describe('seeded random numbers', () => {
  it('same seed gives the same sequence; another seed does not', () => {
    const a = createRng(3);
    const b = createRng(3);
    const c = createRng(4);
    const xs = Array.from({ length: 5 }, () => a.uniform());
    expect(Array.from({ length: 5 }, () => b.uniform())).toEqual(xs);
    expect(Array.from({ length: 5 }, () => c.uniform())).not.toEqual(xs);
  });
  it('normals have mean 0 and variance 1 (50 000 draws, 5 sigma bands)', () => {
    const r = createRng(12);
    let s = 0;
    let s2 = 0;
    const n = 50000;
    for (let i = 0; i < n; i++) {
      const z = r.normal();
      s += z;
      s2 += z * z;
    }
    expect(Math.abs(s / n)).toBeLessThan(5 / Math.sqrt(n));
    expect(Math.abs(s2 / n - 1)).toBeLessThan(5 * Math.sqrt(2 / n));
  });
  it('Cholesky reproduces the matrix and refuses an indefinite one', () => {
    const l = cholesky(covariance)!;
    const back = [0, 1].map((i) => [0, 1].map((j) => l[i][0] * l[j][0] + l[i][1] * l[j][1]));
    expect(back[0][0]).toBeCloseTo(0.0004, 15);
    expect(back[1][0]).toBeCloseTo(0.02, 15);
    expect(back[1][1]).toBeCloseTo(4, 12);
    expect(
      cholesky([
        [1, 2],
        [2, 1],
      ]),
    ).toBeNull();
  });
  it('quantiles by selection equal quantiles of the sorted values, ties included', () => {
    const r = createRng(21);
    for (const n of [1, 2, 7, 1000]) {
      const v = Float64Array.from({ length: n }, () => Math.round(r.uniform() * 50));
      const sorted = Float64Array.from(v).sort();
      const got = quantilesBySelection(v, [0.1, 0.5, 0.9], new Float64Array(n));
      expect(got).toEqual([0.1, 0.5, 0.9].map((p) => quantileSorted(sorted, p)));
    }
  });
  it('a quantile from the band of draws that can decide it equals the quantile over all draws, at every c in the bracket', () => {
    // Unimodal curves w_i(c) = A_i exp(-((c - m_i)/s_i)^2), peaks inside and outside the bracket, ties included.
    const r = createRng(31);
    for (const n of [1, 3, 10, 2000]) {
      const A = Array.from({ length: n }, () => (r.uniform() < 0.1 ? 5 : 1 + r.uniform()));
      const m = Array.from({ length: n }, () => 44 + 12 * r.uniform());
      const sd = Array.from({ length: n }, () => 1 + 5 * r.uniform());
      const w = (i: number, c: number) => A[i] * Math.exp(-(((c - m[i]) / sd[i]) ** 2));
      const map = (x: number) => Math.sqrt(x);
      for (const [a, b] of [
        [46, 50],
        [40, 60],
        [49.9, 50],
      ]) {
        const col = (c: number) => Float64Array.from({ length: n }, (_, i) => w(i, c));
        let evaluated = 0;
        const q = bracketQuantile(n, 0.1, a, b, col(a), col(b), m, (i, c) => (evaluated++, w(i, c)), map);
        expect(q.bandSize).toBeLessThanOrEqual(n);
        for (let j = 0; j <= 20; j++) {
          const c = a + ((b - a) * j) / 20;
          expect(q.at(c)).toBe(quantilesBySelection(col(c), [0.1], new Float64Array(n), map)[0]);
        }
        expect(evaluated).toBeLessThanOrEqual(n + 21 * q.bandSize);
      }
    }
  });
  it('type-7 quantiles', () => {
    expect(quantileSorted([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantileSorted([1, 2, 3, 4, 5], 0.1)).toBeCloseTo(1.4, 12);
  });
});

describe('monteCarlo', () => {
  it('same seed, same result; chunk size does not matter', () => {
    const a = monteCarlo(base, { chunkSize: 100 });
    const b = monteCarlo(base, { chunkSize: 1500 });
    expect(b).toEqual(a);
    expect(monteCarlo({ ...base, seed: 6 })).not.toEqual(a);
  });
  it('zero covariance: every draw has the nominal optimum and product', () => {
    const r = monteCarlo({
      ...base,
      covariance: [
        [0, 0],
        [0, 0],
      ],
      draws: 200,
    });
    const nominal = optimizeSetpoint(enzyme, substrate, 24, [40, 60]);
    expect(r.optimum.p10).toBeCloseTo(nominal.setpointC, 9);
    expect(r.optimum.p90).toBeCloseTo(nominal.setpointC, 9);
    const at45 = r.candidates.find((c) => c.c === 46)!;
    const p45 = simulate(enzyme, substrate, 24, { setpointC: 46 }).productGPerL;
    expect(at45.p10).toBeCloseTo(p45, 10);
    expect(at45.p90).toBeCloseTo(p45, 10);
  });
  it('percentiles are ordered and the robust setpoint has the best P10 among candidates', () => {
    const r = monteCarlo({ ...base, sensorBiasSdC: 0.5, doseRelSd: 0.1 });
    for (const c of r.candidates) {
      expect(c.p10).toBeLessThanOrEqual(c.p50);
      expect(c.p50).toBeLessThanOrEqual(c.p90);
    }
    const bestCandidateP10 = Math.max(...r.candidates.map((c) => c.p10));
    expect(r.robust!.p10).toBeGreaterThanOrEqual(bestCandidateP10);
    expect(r.optimum.p10).toBeLessThan(r.optimum.p90);
  });
  it('with uncertain stability the robust setpoint sits below the nominal optimum (a cooler, safer choice)', () => {
    const r = monteCarlo({
      ...base,
      covariance: [
        [0.09, 0],
        [0, 400],
      ],
      draws: 4000,
    });
    expect(r.robust!.setpointC).toBeLessThan(r.nominal.setpointC);
  });
  it('the spread of the optimum grows with the covariance', () => {
    const narrow = monteCarlo({ ...base, robust: false });
    const wide = monteCarlo({ ...base, robust: false, covariance: covariance.map((row) => row.map((v) => v * 4)) });
    expect(wide.optimum.p90 - wide.optimum.p10).toBeGreaterThan(1.5 * (narrow.optimum.p90 - narrow.optimum.p10));
    expect(narrow.candidates).toEqual([]);
    expect(narrow.robust).toBeNull();
  });
  it('reports rising progress ending at 1', () => {
    const seen: number[] = [];
    monteCarlo(base, { chunkSize: 250, onProgress: (f) => seen.push(f) });
    expect(seen.length).toBeGreaterThan(8);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    expect(seen[seen.length - 1]).toBe(1);
  });
  it('can be driven step by step and cancelled', () => {
    const it1 = monteCarloSteps(base, 500);
    const first = it1.next();
    expect(first.done).toBe(false);
    const signal = { cancelled: false };
    let calls = 0;
    expect(() =>
      monteCarlo(base, {
        chunkSize: 100,
        signal,
        onProgress: () => {
          calls++;
          if (calls === 3) signal.cancelled = true;
        },
      }),
    ).toThrow(ModelCancelledError);
    expect(calls).toBe(3);
  });
  it('Equilibrium Model draws (no closed form): zero covariance gives the nominal optimum', () => {
    const em = { ...enzyme, equilibrium: { teqC: 55, dHeqKJPerMol: 200 } };
    const r = monteCarlo({
      ...base,
      enzyme: em,
      covariance: [
        [0, 0],
        [0, 0],
      ],
      draws: 50,
      robust: false,
    });
    const nominal = optimizeSetpoint(em, substrate, 24, [40, 60]).setpointC;
    expect(Math.abs(r.optimum.p50 - nominal)).toBeLessThan(1e-4);
  });
  it('rejects a covariance that is not positive semi-definite', () => {
    expect(() =>
      monteCarlo({
        ...base,
        covariance: [
          [1, 3],
          [3, 1],
        ],
      }),
    ).toThrow(ModelInputError);
  });
  it('a 3x3 covariance draws Ea too: the optimum then moves with Ea', () => {
    const r = monteCarlo({
      ...base,
      robust: false,
      covariance: [
        [0, 0, 0],
        [0, 0, 0],
        [0, 0, 25],
      ],
    });
    expect(r.optimum.p90 - r.optimum.p10).toBeGreaterThan(0.5);
  });
});
