// The three-model inactivation fit against a general-purpose solver: ml-levenberg-marquardt (npm, 5.1.0) on the same
// points, with each model's mean written out again here from its formula; the covariance against s^2 (J^T J)^-1
// built in this file from central differences and inverted by mathjs (Seber & Wild, Nonlinear Regression, 1989,
// ch. 2: the asymptotic covariance of a least-squares estimate; cited from memory).
import { inv } from 'mathjs';
import { levenbergMarquardt as mlLm } from 'ml-levenberg-marquardt';
import { describe, expect, it } from 'vitest';
import { createRng, fitInactivation, type ErrorModel, type InactivationModelFit, type InactivationPoint } from '../../src/model';

const K = 273.15;
const R = 8.314462618;
const T_REF = 60;
const x = (c: number) => (1000 * (1 / (c + K) - 1 / (T_REF + K))) / R;

// Means from the model formulas, in the engine's parameter order (see `parameters` of each model).
const MEAN: Record<InactivationModelFit['name'], (th: number[], p: InactivationPoint) => number> = {
  'first-order': ([lk, ed], p) => Math.exp(-Math.exp(lk - ed * x(p.c)) * p.h),
  'first-order-a0': ([lk, ed, la0], p) => Math.exp(la0) * Math.exp(-Math.exp(lk - ed * x(p.c)) * p.h),
  'two-fraction': ([lk1, ed1, lk2, ed2, logit], p) => {
    const share = 1 / (1 + Math.exp(-logit));
    return (1 - share) * Math.exp(-Math.exp(lk1 - ed1 * x(p.c)) * p.h) + share * Math.exp(-Math.exp(lk2 - ed2 * x(p.c)) * p.h);
  },
};

function thetaOf(m: InactivationModelFit): number[] {
  const th = [Math.log(m.kdRefPerH), m.edKJPerMol];
  if (m.a0 !== undefined) th.push(Math.log(m.a0));
  if (m.stableFraction) {
    const s = m.stableFraction;
    th.push(Math.log(s.kdRefPerH), s.edKJPerMol, Math.log(s.share / (1 - s.share)));
  }
  return th;
}

function data(
  truth: { name: InactivationModelFit['name']; th: number[] },
  errorModel: ErrorModel,
  sd: number,
  temps: number[],
  hours: number[],
  seed: number,
): InactivationPoint[] {
  const rng = createRng(seed);
  const pts: InactivationPoint[] = [];
  for (const c of temps)
    for (const h of hours) {
      const m = MEAN[truth.name](truth.th, { c, h, residual: 0 });
      pts.push({ c, h, residual: errorModel === 'relative' ? m * Math.exp(sd * rng.normal()) : m + sd * rng.normal() });
    }
  return pts;
}

const response = (errorModel: ErrorModel) => (v: number) => (errorModel === 'relative' ? Math.log(v) : v);

type Truth = { name: InactivationModelFit['name']; th: number[] };
const TEMPS = [55, 60, 65, 70];
const FIRST_ORDER: Truth = { name: 'first-order', th: [Math.log(0.2), 250] };
const HEAT_UP_LOSS: Truth = { name: 'first-order-a0', th: [Math.log(0.2), 250, Math.log(0.85)] };
const TWO_FRACTIONS: Truth = { name: 'two-fraction', th: [Math.log(0.8), 250, Math.log(0.04), 300, Math.log(0.3 / 0.7)] };
// Each truth in both error models, with the noise sd of each (ln scale when relative, fraction when absolute).
const cases = (
  [
    ['first order', FIRST_ORDER, [0.25, 0.5, 1, 2, 4], 0.04, 0.015],
    ['heat-up loss (a0 = 0.85)', HEAT_UP_LOSS, [0, 0.5, 1, 2, 4], 0.03, 0.01],
    ['two fractions (30 % stable)', TWO_FRACTIONS, [0.25, 0.5, 1, 2, 4, 8, 16], 0.02, 0.005],
  ] as const
).flatMap(([label, truth, hours, relSd, absSd]) =>
  (['relative', 'absolute'] as const).map((errorModel) => ({
    label: `${label}, ${errorModel}`,
    truth,
    errorModel,
    sd: errorModel === 'relative' ? relSd : absSd,
    temps: TEMPS,
    hours: [...hours],
  })),
);

describe('fit against ml-levenberg-marquardt and an independent covariance', () => {
  it.each(cases)('$label: same optimum (every parameter within 1e-3 of its se), same covariance (1e-4 rel), chosen = truth', (cs) => {
    const pts = data(cs.truth, cs.errorModel, cs.sd, cs.temps, cs.hours, 16);
    const f = fitInactivation(T_REF, pts, { errorModel: cs.errorModel });
    const m = f.models.find((v) => v.name === cs.truth.name)!;
    expect(m.singular).toBeUndefined();
    expect(f.chosen).toBe(cs.truth.name);
    const th = thetaOf(m);
    const y = response(cs.errorModel);
    const mean = MEAN[cs.truth.name];
    const ssrAt = (t: number[]) => pts.reduce((s, p) => s + (y(p.residual) - y(mean(t, p))) ** 2, 0);

    // ml-levenberg-marquardt from the truth moved by about 5 % (never from the engine's answer), analytic-free:
    // central differences of the model written above.
    const start = cs.truth.th.map((v, i) => (i % 2 === 0 ? v + 0.05 : v * 1.03));
    const ref = mlLm({ x: pts.map((_, i) => i), y: pts.map((p) => y(p.residual)) }, (t) => (i) => y(mean(t, pts[i])), {
      initialValues: start,
      maxIterations: 3000,
      errorTolerance: 1e-15,
      gradientDifference: 1e-7,
      centralDifference: true,
      damping: 1e-2,
    });
    // The engine's sum of squares is never worse than the reference solver's.
    expect(ssrAt(th)).toBeLessThanOrEqual(ssrAt(ref.parameterValues) * (1 + 1e-9));
    const se = m.covariance.map((row, i) => Math.sqrt(row[i]));
    ref.parameterValues.forEach((v, i) => expect(Math.abs(v - th[i]) / se[i], m.parameters[i]).toBeLessThan(1e-3));

    // Covariance s^2 (J^T J)^-1 with J by central differences at the engine's optimum.
    const k = th.length;
    const jac = pts.map((p) =>
      th.map((_, a) => {
        const d = 1e-5 * Math.max(1, Math.abs(th[a]));
        const hi = [...th];
        const lo = [...th];
        hi[a] += d;
        lo[a] -= d;
        return (y(mean(hi, p)) - y(mean(lo, p))) / (2 * d);
      }),
    );
    const jtj = th.map((_, a) => th.map((_, b) => jac.reduce((s, row) => s + row[a] * row[b], 0)));
    const s2 = ssrAt(th) / (pts.length - k);
    const cov = (inv(jtj) as number[][]).map((row) => row.map((v) => v * s2));
    for (let a = 0; a < k; a++)
      for (let b = 0; b < k; b++) expect(Math.abs(m.covariance[a][b] - cov[a][b]) / Math.sqrt(cov[a][a] * cov[b][b]), `cov ${a},${b}`).toBeLessThan(1e-4);
  });
});
