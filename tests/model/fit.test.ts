import { describe, expect, it } from 'vitest';
import {
  ModelInputError,
  arrheniusFactor,
  createRng,
  fitInactivation,
  fitInitialRates,
  halfLifeAt,
  residualScale,
  studentTQuantile,
  type InactivationPoint,
} from '../../src/model';

function synthetic(seed: number, truth: { kd: number; ed: number }, noiseSd: number, temps = [55, 60, 65, 70]): InactivationPoint[] {
  const rng = createRng(seed);
  const pts: InactivationPoint[] = [];
  for (const c of temps)
    for (const h of [0.25, 0.5, 1, 2, 4]) {
      const k = truth.kd * arrheniusFactor(truth.ed, c, 60);
      pts.push({ c, h, residual: Math.exp(-k * h + noiseSd * rng.normal()) });
    }
  return pts;
}

describe('fitInactivation', () => {
  it('recovers exact parameters from noise-free data', () => {
    const f = fitInactivation(60, synthetic(1, { kd: 0.2, ed: 250 }, 0));
    expect(f.kdRefPerH).toBeCloseTo(0.2, 10);
    expect(f.edKJPerMol).toBeCloseTo(250, 7);
    expect(f.halfLifeRefH).toBeCloseTo(Math.LN2 / 0.2, 9);
    expect(f.twoStep.edKJPerMol).toBeCloseTo(250, 7);
  });
  // Agreement with ml-levenberg-marquardt for all three models and both error models: fit-crosscheck.test.ts.
  // Coverage by simulation: for a correctly specified model the 95 % Wald/Student intervals of a nonlinear least-squares
  // fit cover the truth close to 95 % of the time (Seber & Wild, Nonlinear Regression, Wiley 1989, ch. 5, cited from memory). 400 seeded
  // data sets per error model (the issue asks for at least 200; with 400 the binomial sd of the rate is 1.1 points,
  // so 92-98 % is +-2.7 sd). Measured on other seeds: the first-order fit alone 94.6-95.2 % (3000 sets); with the
  // AICc choice, the chosen model's 93.0-94.7 % (2000 sets), lower because AICc picks first-order-a0 in about 4 % of the sets and those intervals,
  // conditional on that choice, miss more often (post-selection inference).
  it.each([
    { errorModel: 'relative', sd: 0.05 },
    { errorModel: 'absolute', sd: 0.02 },
  ] as const)('$errorModel noise: 95 % intervals of kd, Ed and t1/2 at 70 degC cover the truth 92-98 % of 400 data sets', ({ errorModel, sd }) => {
    const truth = { kd: 0.15, ed: 280 };
    const trueHalf70 = Math.LN2 / (truth.kd * arrheniusFactor(truth.ed, 70, 60));
    const sets = 400;
    const cover = { kd: 0, ed: 0, half70: 0, firstOrderKd: 0, firstOrderEd: 0 };
    for (let s = 0; s < sets; s++) {
      const rng = createRng(1 + s);
      const pts: InactivationPoint[] = [];
      for (const c of [55, 60, 65, 70])
        for (const h of [0.25, 0.5, 1, 2, 4]) {
          const m = Math.exp(-truth.kd * arrheniusFactor(truth.ed, c, 60) * h);
          // Relative: multiplicative log-normal noise; absolute: additive on the fraction (readings can go below 0).
          pts.push({ c, h, residual: errorModel === 'relative' ? m * Math.exp(sd * rng.normal()) : m + sd * rng.normal() });
        }
      const f = fitInactivation(60, pts, { errorModel });
      // The interval the product shows: the chosen model's, on ln kd (exp of it for kd) and on Ed.
      const q = studentTQuantile(0.975, f.dof);
      if (Math.abs(Math.log(f.kdRefPerH / truth.kd)) <= q * Math.sqrt(f.covariance[0][0])) cover.kd++;
      if (Math.abs(f.edKJPerMol - truth.ed) <= q * Math.sqrt(f.covariance[1][1])) cover.ed++;
      const h = halfLifeAt(f, 70);
      if (h.lowerH <= trueHalf70 && trueHalf70 <= h.upperH) cover.half70++;
      // The true model's own intervals, whatever AICc chose.
      const fo = f.models.find((m) => m.name === 'first-order')!;
      const qf = studentTQuantile(0.975, fo.dof);
      if (Math.abs(Math.log(fo.kdRefPerH / truth.kd)) <= qf * Math.sqrt(fo.covariance[0][0])) cover.firstOrderKd++;
      if (Math.abs(fo.edKJPerMol - truth.ed) <= qf * Math.sqrt(fo.covariance[1][1])) cover.firstOrderEd++;
    }
    for (const [what, c] of Object.entries(cover)) {
      expect(c / sets, what).toBeGreaterThanOrEqual(0.92);
      expect(c / sets, what).toBeLessThanOrEqual(0.98);
    }
  });
  it.each(['relative', 'absolute'] as const)(
    '%s: replicates fitted as weighted rows give the fit to every point (parameters, covariance, AICc, lack of fit)',
    (errorModel) => {
      // 4 temperatures x 6 times x 1-5 replicates, biphasic truth so that all three models are fitted and differ.
      const rng = createRng(404);
      const pts: InactivationPoint[] = [];
      for (const c of [55, 60, 65, 70])
        for (const h of [0.25, 0.5, 1, 2, 4, 8]) {
          const m = 0.75 * Math.exp(-0.4 * arrheniusFactor(260, c, 60) * h) + 0.25 * Math.exp(-0.03 * arrheniusFactor(300, c, 60) * h);
          for (let r = 0, reps = 1 + Math.floor(5 * rng.uniform()); r < reps; r++)
            pts.push({ c, h, residual: errorModel === 'relative' ? m * Math.exp(0.03 * rng.normal()) : m + 0.01 * rng.normal() });
        }
      // Shuffled, so that replicates are not adjacent in the input.
      for (let i = pts.length - 1; i > 0; i--) {
        const j = Math.floor(rng.uniform() * (i + 1));
        [pts[i], pts[j]] = [pts[j], pts[i]];
      }
      const rows = fitInactivation(60, pts, { errorModel });
      const every = fitInactivation(60, pts, { errorModel, collapseReplicates: false });
      expect(rows.chosen).toBe(every.chosen);
      expect(rows.lackOfFit).toBe(every.lackOfFit);
      expect(rows.n).toBe(pts.length);
      expect(rows.models.map((m) => m.name)).toEqual(every.models.map((m) => m.name));
      rows.models.forEach((m, k) => {
        const e = every.models[k];
        expect(m.dof).toBe(e.dof);
        expect(m.aicc!).toBeCloseTo(e.aicc!, 6);
        expect(m.residualSd / e.residualSd - 1).toBeLessThan(1e-9);
        if (e.singular) return;
        const sd = e.covariance.map((row, i) => Math.sqrt(row[i]));
        expect(Math.abs(Math.log(m.kdRefPerH / e.kdRefPerH)) / sd[0]).toBeLessThan(1e-5);
        expect(Math.abs(m.edKJPerMol - e.edKJPerMol) / sd[1]).toBeLessThan(1e-5);
        for (let a = 0; a < sd.length; a++)
          for (let b = 0; b < sd.length; b++) expect(Math.abs(m.covariance[a][b] - e.covariance[a][b]) / (sd[a] * sd[b])).toBeLessThan(1e-5);
      });
    },
  );
  it('half-life interval is narrowest near the middle of the data and brackets the estimate', () => {
    const f = fitInactivation(60, synthetic(3, { kd: 0.2, ed: 250 }, 0.04));
    const mid = halfLifeAt(f, 62.5);
    const far = halfLifeAt(f, 85);
    expect(mid.lowerH).toBeLessThan(mid.halfLifeH);
    expect(mid.upperH).toBeGreaterThan(mid.halfLifeH);
    expect(far.upperH / far.lowerH).toBeGreaterThan(mid.upperH / mid.lowerH);
  });
  const bad: [string, InactivationPoint[], string, string][] = [
    [
      'one temperature',
      [
        { c: 60, h: 1, residual: 0.5 },
        { c: 60, h: 2, residual: 0.25 },
        { c: 60, h: 3, residual: 0.12 },
      ],
      'points',
      'needs at least two temperatures',
    ],
    [
      'residual <= 0',
      [
        { c: 60, h: 1, residual: 0.5 },
        { c: 65, h: 2, residual: 0 },
        { c: 60, h: 3, residual: 0.12 },
      ],
      'points[1].residual',
      'must be a fraction > 0 and <= 1.5 (got 0)',
    ],
    [
      'residual > 1.5 (percent)',
      [
        { c: 60, h: 1, residual: 50 },
        { c: 65, h: 2, residual: 25 },
        { c: 60, h: 3, residual: 12 },
      ],
      'points[0].residual',
      'must be a fraction > 0 and <= 1.5 (got 50: per cent? give fractions)',
    ],
    [
      'no decay',
      [
        { c: 60, h: 1, residual: 1 },
        { c: 65, h: 2, residual: 1.02 },
        { c: 60, h: 3, residual: 1.01 },
      ],
      'points',
      'shows no decay',
    ],
    [
      'too few points',
      [
        { c: 60, h: 1, residual: 0.5 },
        { c: 65, h: 2, residual: 0.25 },
      ],
      'points',
      'needs at least three points',
    ],
    [
      'singular (all at time zero but one)',
      [
        { c: 60, h: 0, residual: 1 },
        { c: 65, h: 0, residual: 0.99 },
        { c: 65, h: 1, residual: 0.5 },
      ],
      'points',
      'gives a singular fit',
    ],
  ];
  it.each(bad)('rejects %s with field and rule', (_n, pts, field, rule) => {
    try {
      fitInactivation(60, pts);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ModelInputError);
      expect((e as ModelInputError).field).toBe(field);
      expect((e as ModelInputError).rule).toBe(rule);
    }
  });
  it('residualScale tells percent from fraction', () => {
    expect(residualScale([100, 80, 45])).toBe('percent');
    expect(residualScale([1, 0.8, 0.45])).toBe('fraction');
  });
});

describe('Student t quantile', () => {
  it.each([
    [1, 12.706],
    [2, 4.303],
    [10, 2.228],
    [30, 2.042],
  ])('t(0.975, %i) = %f ([M] standard t tables)', (dof, t) => {
    expect(studentTQuantile(0.975, dof)).toBeCloseTo(t, 3);
  });
  it('approaches the normal quantile 1.95996 for large dof ([M])', () => {
    expect(studentTQuantile(0.975, 1e6)).toBeCloseTo(1.95996, 4);
  });
});

describe('fitInitialRates', () => {
  it('recovers Ea from Arrhenius data', () => {
    const pts = [20, 30, 40, 50].map((c) => ({ c, rate: 3 * arrheniusFactor(60, c, 40) }));
    const f = fitInitialRates(pts, 40);
    expect(f.model).toBe('arrhenius');
    expect(f.eaKJPerMol).toBeCloseTo(60, 8);
    expect(f.rateRef).toBeCloseTo(3, 8);
  });
  it('fits the Equilibrium Model when the rate drops past a peak', () => {
    const K = 273.15;
    const R = 8.314462618;
    const rng = createRng(8);
    const pts = [];
    for (let c = 20; c <= 80; c += 5) {
      const keq = Math.exp(((180 * 1000) / R) * (1 / (65 + K) - 1 / (c + K)));
      pts.push({ c, rate: (arrheniusFactor(55, c, 60) / (1 + keq)) * Math.exp(0.01 * rng.normal()) });
    }
    const f = fitInitialRates(pts, 60);
    expect(f.model).toBe('equilibrium');
    expect(Math.abs(f.eaKJPerMol - 55)).toBeLessThan(4 * f.se.eaKJPerMol + 0.5);
    expect(Math.abs(f.equilibrium!.teqC - 65)).toBeLessThan(1);
    expect(Math.abs(f.equilibrium!.dHeqKJPerMol - 180)).toBeLessThan(15);
  });
});
