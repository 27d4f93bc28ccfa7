// Calibration from closed batches, checked against independent computations of the same posterior: a dense grid
// (two parameters) and a random-walk Metropolis sampler written here (three parameters), both on the engine's own
// simulate, as Gelman et al., Bayesian Data Analysis, 3rd ed., ch. 4 and 11 check normal approximations; a seeded
// coverage study (ch. 10, simulation from the prior); leave-one-out checks (ch. 7).
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ruleOf } from '../support/model';
import {
  calibrate,
  cholesky,
  createRng,
  productSensitivity,
  simulate,
  validateCalibrateInput,
  type CalibrationBatch,
  type EnzymeParams,
  type Rng,
  type Substrate,
  type TemperatureInput,
} from '../../src/model';

const enzyme: EnzymeParams = { tRefC: 60, vmaxRef: 8, eaKJPerMol: 50, kdRefPerH: Math.LN2 / 20, edKJPerMol: 300 };
const substrate: Substrate = { s0GPerL: 200, kmGPerL: 15 };
type Theta = [number, number, number];
const prior: Theta = [Math.log(enzyme.kdRefPerH), enzyme.edKJPerMol, 0];

/** The enzyme at theta = [ln kdRefPerH, edKJPerMol, ln vmaxScale]. */
function at(theta: readonly number[], e: EnzymeParams = enzyme): EnzymeParams {
  return { ...e, kdRefPerH: Math.exp(theta[0]), edKJPerMol: theta[1], vmaxRef: e.vmaxRef * Math.exp(theta[2]) };
}

function covarianceOf(sd: number[], corr01 = 0): number[][] {
  return [
    [sd[0] ** 2, corr01 * sd[0] * sd[1], 0],
    [corr01 * sd[0] * sd[1], sd[1] ** 2, 0],
    [0, 0, sd[2] ** 2],
  ];
}

function drawTheta(rng: Rng, cov: number[][]): Theta {
  const l = cholesky(cov)!;
  const z = [rng.normal(), rng.normal(), rng.normal()];
  return [0, 1, 2].map((i) => prior[i] + l[i][0] * z[0] + l[i][1] * z[1] + l[i][2] * z[2]) as Theta;
}

/** Batches measured from a true lot with relative noise; programs vary so that kd, Ed and the scale separate. */
function batchesFrom(rng: Rng, truth: EnzymeParams, n: number, relSd = 0.02): CalibrationBatch[] {
  return Array.from({ length: n }, (_, i) => {
    const batchH = 24 + 24 * rng.uniform();
    const c = 44 + 12 * rng.uniform();
    const temperature: TemperatureInput =
      i % 3 === 2
        ? {
            stages: [
              { hours: batchH / 2, c: c - 2 },
              { hours: batchH / 2, c: c + 2 },
            ],
          }
        : i % 3 === 1
          ? {
              log: [
                { h: 0, c: 20 },
                { h: 1, c },
                { h: batchH / 2, c: c + 1 },
                { h: batchH, c: c + 3 },
              ],
            }
          : { setpointC: c };
    const p = simulate(truth, substrate, batchH, temperature).productGPerL;
    const sd = relSd * p;
    return { batchH, temperature, measuredProductGPerL: p + sd * rng.normal(), measurementSdGPerL: sd };
  });
}

function logPosterior(theta: readonly number[], precision: number[][], batches: CalibrationBatch[]): number {
  const d = theta.map((v, i) => v - prior[i]);
  let s = 0;
  for (let i = 0; i < 3; i++) for (let k = 0; k < 3; k++) s -= 0.5 * d[i] * precision[i][k] * d[k];
  const e = at(theta);
  for (const b of batches) {
    const r = (b.measuredProductGPerL - simulate(e, substrate, b.batchH, b.temperature).productGPerL) / b.measurementSdGPerL;
    s -= 0.5 * r * r;
  }
  return s;
}

function inverse3(a: number[][]): number[][] {
  const [[a00, a01, a02], [a10, a11, a12], [a20, a21, a22]] = a;
  const c00 = a11 * a22 - a12 * a21;
  const c01 = a02 * a21 - a01 * a22;
  const c02 = a01 * a12 - a02 * a11;
  const det = a00 * c00 + a10 * c01 + a20 * c02;
  return [
    [c00, c01, c02],
    [a12 * a20 - a10 * a22, a00 * a22 - a02 * a20, a02 * a10 - a00 * a12],
    [a10 * a21 - a11 * a20, a01 * a20 - a00 * a21, a00 * a11 - a01 * a10],
  ].map((row) => row.map((v) => v / det));
}

describe('forward-mode derivatives of product', () => {
  const rng = createRng(11);
  const minuteLog = [];
  let c = 20;
  for (let m = 0; m <= 48 * 60; m++) {
    c += 0.3 * ((m < 60 ? 20 + (30 * m) / 60 : 50 + m / 720) - c) + 0.05 * rng.normal();
    minuteLog.push({ h: m / 60, c });
  }
  const cases: [string, EnzymeParams, number, TemperatureInput][] = [
    ['setpoint', enzyme, 24, { setpointC: 55 }],
    ['setpoint, kd tiny (series branch)', { ...enzyme, kdRefPerH: 1e-7 }, 24, { setpointC: 45 }],
    [
      'stages cut by the batch end',
      enzyme,
      20,
      {
        stages: [
          { hours: 6, c: 48 },
          { hours: 30, c: 54 },
        ],
      },
    ],
    [
      'log with a hold, a step and readings past the end',
      enzyme,
      20,
      {
        log: [
          { h: 1, c: 40 },
          { h: 3, c: 60 },
          { h: 3, c: 50 },
          { h: 30, c: 52 },
        ],
      },
    ],
    ['48 h log at 1-minute readings', enzyme, 48, { log: minuteLog }],
    [
      'fast loss on a ramp (4- and 6-node rules)',
      { ...enzyme, kdRefPerH: 2 },
      10,
      {
        log: [
          { h: 0, c: 40 },
          { h: 10, c: 70 },
        ],
      },
    ],
    [
      'Equilibrium Model',
      { ...enzyme, equilibrium: { teqC: 58, dHeqKJPerMol: 150 } },
      30,
      {
        log: [
          { h: 0, c: 30 },
          { h: 2, c: 58 },
          { h: 30, c: 61 },
        ],
      },
    ],
  ];
  it.each(cases)('%s: value is simulate, gradient matches central differences', (_name, e, batchH, temperature) => {
    const s = productSensitivity(e, substrate, batchH, temperature);
    const p = simulate(e, substrate, batchH, temperature).productGPerL;
    expect(Math.abs(s.productGPerL / p - 1)).toBeLessThan(1e-13);
    const base: Theta = [Math.log(e.kdRefPerH), e.edKJPerMol, 0];
    const steps = [1e-5, 1e-4, 1e-5];
    const scale = Math.max(...s.gradient.map((g, k) => Math.abs(g) * steps[k] * 1e5));
    for (let k = 0; k < 3; k++) {
      const up = [...base];
      const down = [...base];
      up[k] += steps[k];
      down[k] -= steps[k];
      const fd =
        (simulate(at(up, e), substrate, batchH, temperature).productGPerL - simulate(at(down, e), substrate, batchH, temperature).productGPerL) /
        (2 * steps[k]);
      // Central differences carry ~1e-10 relative truncation and rounding here; a derivative near zero is judged against the largest.
      expect(Math.abs(s.gradient[k] - fd) * steps[k] * 1e5).toBeLessThan(1e-6 * scale + 1e-12);
    }
  });
});

describe('posterior against a dense grid (two parameters, Ed held by a prior sd of 0.001 kJ/mol)', () => {
  // Few batches, wide prior: the posterior of ln kd is skewed (its Laplace mode lies 0.18 sd above the grid's mean).
  const rng = createRng(5);
  const cov = covarianceOf([0.3, 0.001, 0.3]);
  const truth = at([prior[0] + 0.24, prior[1], -0.21]);
  const batches = batchesFrom(rng, truth, 3, 0.03);
  const r = calibrate({ enzyme, substrate, covariance: cov, batches });
  const mode = [Math.log(r.posterior.kdRefPerH), Math.log(r.posterior.vmaxScale)];
  const sd = [Math.sqrt(r.posterior.covariance[0][0]), Math.sqrt(r.posterior.covariance[2][2])];
  // Riemann sum over +-8 sd on 241 x 241 points of the exact log posterior (the engine's simulate at each point).
  const precision = inverse3(cov);
  const n = 241;
  const lp: number[] = [];
  const pts: [number, number][] = [];
  for (let i = 0; i < n; i++)
    for (let k = 0; k < n; k++) {
      const a = mode[0] + sd[0] * 8 * ((2 * i) / (n - 1) - 1);
      const b = mode[1] + sd[1] * 8 * ((2 * k) / (n - 1) - 1);
      pts.push([a, b]);
      lp.push(logPosterior([a, prior[1], b], precision, batches));
    }
  const top = Math.max(...lp);
  let w = 0;
  const m = [0, 0];
  const s2 = [0, 0];
  pts.forEach(([a, b], i) => {
    const p = Math.exp(lp[i] - top);
    w += p;
    m[0] += p * a;
    m[1] += p * b;
    s2[0] += p * a * a;
    s2[1] += p * b * b;
  });
  const gridMean = m.map((v) => v / w);
  const gridSd = s2.map((v, i) => Math.sqrt(v / w - gridMean[i] ** 2));
  it.each([
    ['ln kdRefPerH', 0],
    ['ln vmaxScale', 1],
  ])('%s: mean within 0.1 sd, sd within 10 %', (_name, i) => {
    expect(Math.abs(mode[i] - gridMean[i])).toBeLessThan(0.1 * gridSd[i]);
    expect(Math.abs(sd[i] / gridSd[i] - 1)).toBeLessThan(0.1);
  });
  it('the data moved the posterior well away from the prior (the check is not the prior against itself)', () => {
    expect(Math.abs(mode[1]) / 0.3).toBeGreaterThan(0.5);
    expect(sd[1]).toBeLessThan(0.3 / 3);
  });
});

describe('posterior against random-walk Metropolis (three parameters)', () => {
  const rng = createRng(9);
  const cov = covarianceOf([0.2, 8, 0.25], 0.3);
  const truth = at([prior[0] - 0.15, prior[1] + 6, 0.15]);
  const batches = batchesFrom(rng, truth, 5, 0.03);
  const r = calibrate({ enzyme, substrate, covariance: cov, batches });
  const mode = [Math.log(r.posterior.kdRefPerH), r.posterior.edKJPerMol, Math.log(r.posterior.vmaxScale)];
  const sd = [0, 1, 2].map((i) => Math.sqrt(r.posterior.covariance[i][i]));
  // Proposal: 2.38^2/d times a covariance from a pilot run of the chain itself (Gelman et al., ch. 12), so the
  // sampler does not lean on the Laplace answer it checks; 80 000 steps after 5 000 of burn-in.
  const precision = inverse3(cov);
  const mcmc = (x0: number[], propCov: number[][], steps: number, keep: boolean) => {
    const l = cholesky(propCov.map((row) => row.map((v) => (v * 2.38 ** 2) / 3)))!;
    let x = [...x0];
    let lpx = logPosterior(x, precision, batches);
    const kept: number[][] = [];
    for (let s = 0; s < steps; s++) {
      const z = [rng.normal(), rng.normal(), rng.normal()];
      const y = x.map((v, i) => v + l[i][0] * z[0] + l[i][1] * z[1] + l[i][2] * z[2]);
      const lpy = logPosterior(y, precision, batches);
      if (Math.log(rng.uniform()) < lpy - lpx) {
        x = y;
        lpx = lpy;
      }
      if (keep) kept.push(x);
    }
    return { x, kept };
  };
  const moments = (xs: number[][]) => {
    const mean = [0, 1, 2].map((i) => xs.reduce((s, x) => s + x[i], 0) / xs.length);
    const c = [0, 1, 2].map((i) => [0, 1, 2].map((k) => xs.reduce((s, x) => s + (x[i] - mean[i]) * (x[k] - mean[k]), 0) / (xs.length - 1)));
    return { mean, c };
  };
  const pilot = mcmc(
    prior,
    cov.map((row) => row.map((v) => v / 25)),
    20000,
    true,
  );
  const pilotMoments = moments(pilot.kept.slice(5000));
  const burn = mcmc(pilot.x, pilotMoments.c, 5000, false);
  const chain = moments(mcmc(burn.x, pilotMoments.c, 80000, true).kept);
  it.each([
    ['ln kdRefPerH', 0],
    ['edKJPerMol', 1],
    ['ln vmaxScale', 2],
  ])('%s: mean within 0.1 sd, sd within 10 %', (_name, i) => {
    const chainSd = Math.sqrt(chain.c[i][i]);
    expect(Math.abs(mode[i] - chain.mean[i])).toBeLessThan(0.1 * chainSd);
    expect(Math.abs(sd[i] / chainSd - 1)).toBeLessThan(0.1);
  });
});

describe('seeded coverage: truth drawn from the prior, 1 to 20 closed batches, 240 replications', () => {
  const rng = createRng(2026);
  const cov = covarianceOf([0.2, 8, 0.2], 0.4);
  let covered = 0;
  let intervals = 0;
  const perParameter = [0, 0, 0];
  let priorSq = 0;
  let postSq = 0;
  const reps = 240;
  for (let rep = 0; rep < reps; rep++) {
    const truthTheta = drawTheta(rng, cov);
    const truth = at(truthTheta);
    const batches = batchesFrom(rng, truth, 1 + (rep % 20));
    const r = calibrate({ enzyme, substrate, covariance: cov, batches });
    const mean = [Math.log(r.posterior.kdRefPerH), r.posterior.edKJPerMol, Math.log(r.posterior.vmaxScale)];
    for (let i = 0; i < 3; i++) {
      const inside = Math.abs(truthTheta[i] - mean[i]) <= 1.959964 * Math.sqrt(r.posterior.covariance[i][i]);
      covered += inside ? 1 : 0;
      perParameter[i] += inside ? 1 : 0;
      intervals++;
    }
    // A held-out batch of the same lot, forecast from the prior means and from the posterior values.
    const [held] = batchesFrom(rng, truth, 1);
    const post = at(mean);
    priorSq += (held.measuredProductGPerL - simulate(enzyme, substrate, held.batchH, held.temperature).productGPerL) ** 2;
    postSq += (held.measuredProductGPerL - simulate(post, substrate, held.batchH, held.temperature).productGPerL) ** 2;
  }
  it('95 % intervals cover the truth 92-98 % of the time (all three parameters pooled)', () => {
    expect(covered / intervals).toBeGreaterThanOrEqual(0.92);
    expect(covered / intervals).toBeLessThanOrEqual(0.98);
  });
  it('each parameter on its own stays within 3 binomial sd of 95 % (240 intervals: 90.8-99.2 %)', () => {
    for (const c of perParameter) {
      expect(c / reps).toBeGreaterThan(0.908);
      expect(c / reps).toBeLessThan(0.992);
    }
  });
  it('the held-out forecast error falls below the prior forecast error', () => {
    expect(Math.sqrt(postSq / reps)).toBeLessThan(0.5 * Math.sqrt(priorSq / reps));
  });
});

describe('leave-one-out residuals and outliers', () => {
  const rng = createRng(31);
  const cov = covarianceOf([0.2, 8, 0.2], 0.4);
  const truth = at([prior[0] + 0.1, prior[1] - 5, -0.1]);
  const good = batchesFrom(rng, truth, 10);
  const bad = { ...good[4], measuredProductGPerL: good[4].measuredProductGPerL + 8 * good[4].measurementSdGPerL };
  const withOutlier = [...good.slice(0, 4), bad, ...good.slice(5)];
  const r = calibrate({ enzyme, substrate, covariance: cov, batches: withOutlier });
  const without = calibrate({ enzyme, substrate, covariance: cov, batches: withOutlier.filter((b) => b !== bad) });

  it('the outlier is flagged beyond 3 and the good batches are not', () => {
    expect(Math.abs(r.batches[4].standardisedResidual)).toBeGreaterThan(3);
    expect(r.batches[4].outlier).toBe(true);
    for (const [i, b] of r.batches.entries()) if (i !== 4) expect([b.outlier, Math.abs(b.standardisedResidual) < 3]).toEqual([false, true]);
  });
  it("the posterior keeps the outlier (leaving it out is the engineer's choice) while the others are judged without it", () => {
    expect(Math.abs(Math.log(r.posterior.vmaxScale / without.posterior.vmaxScale))).toBeGreaterThan(0.2 * Math.sqrt(without.posterior.covariance[2][2]));
    const others = r.batches.filter((_, i) => i !== 4);
    others.forEach((b, i) => expect(b.standardisedResidual).toBeCloseTo(without.batches[i].standardisedResidual, 3));
  });
  it("the outlier's residual is against the posterior of all the others", () => {
    const e = at([Math.log(without.posterior.kdRefPerH), without.posterior.edKJPerMol, Math.log(without.posterior.vmaxScale)]);
    const s = productSensitivity(e, substrate, bad.batchH, bad.temperature);
    const g = s.gradient;
    let v = 0;
    for (let i = 0; i < 3; i++) for (let k = 0; k < 3; k++) v += g[i] * without.posterior.covariance[i][k] * g[k];
    // Leave-one-out works about the others' Laplace mode; the posterior reported is their mean: 5 % of the sd apart at most here.
    expect(Math.abs(r.batches[4].leaveOneOutForecastGPerL - s.productGPerL)).toBeLessThan(0.05 * bad.measurementSdGPerL);
    const z = (bad.measuredProductGPerL - s.productGPerL) / Math.sqrt(bad.measurementSdGPerL ** 2 + v);
    expect(Math.abs(r.batches[4].standardisedResidual - z)).toBeLessThan(0.05);
  });
  it('the one-step leave-one-out of a good batch agrees with calibrating on the other batches', () => {
    const k = 2;
    const rest = calibrate({ enzyme, substrate, covariance: cov, batches: good.filter((_, i) => i !== k) });
    const all = calibrate({ enzyme, substrate, covariance: cov, batches: good });
    const e = at([Math.log(rest.posterior.kdRefPerH), rest.posterior.edKJPerMol, Math.log(rest.posterior.vmaxScale)]);
    const s = productSensitivity(e, substrate, good[k].batchH, good[k].temperature);
    let v = 0;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) v += s.gradient[i] * rest.posterior.covariance[i][j] * s.gradient[j];
    const z = (good[k].measuredProductGPerL - s.productGPerL) / Math.sqrt(good[k].measurementSdGPerL ** 2 + v);
    expect(Math.abs(all.batches[k].standardisedResidual - z)).toBeLessThan(0.05);
    expect(Math.abs(all.batches[k].leaveOneOutForecastGPerL - s.productGPerL)).toBeLessThan(0.05 * good[k].measurementSdGPerL);
  });
  it('forecasts are the model at the prior means and at the posterior values', () => {
    const post = at([Math.log(r.posterior.kdRefPerH), r.posterior.edKJPerMol, Math.log(r.posterior.vmaxScale)]);
    for (const [i, b] of withOutlier.entries()) {
      expect(r.batches[i].priorForecastGPerL).toBeCloseTo(simulate(enzyme, substrate, b.batchH, b.temperature).productGPerL, 10);
      expect(r.batches[i].posteriorForecastGPerL).toBeCloseTo(simulate(post, substrate, b.batchH, b.temperature).productGPerL, 10);
    }
  });
  it('no batches: the posterior is the prior', () => {
    const none = calibrate({ enzyme, substrate, covariance: cov, batches: [] });
    expect(none.posterior.kdRefPerH).toBeCloseTo(enzyme.kdRefPerH, 15);
    expect(none.posterior.edKJPerMol).toBe(enzyme.edKJPerMol);
    expect(none.posterior.vmaxScale).toBe(1);
    none.posterior.covariance.forEach((row, i) => row.forEach((v, k) => expect(v).toBeCloseTo(cov[i][k], 12)));
  });
});

describe('calibrate input', () => {
  const cov = covarianceOf([0.2, 8, 0.2]);
  const batch = { batchH: 24, temperature: { setpointC: 50 }, measuredProductGPerL: 100, measurementSdGPerL: 2 };
  const base = { enzyme, substrate, covariance: cov, batches: [batch] };
  it.each([
    [
      '2x2 covariance',
      {
        ...base,
        covariance: [
          [0.04, 0],
          [0, 64],
        ],
      },
      'covariance: must be 3x3 (ln kdRefPerH, edKJPerMol, ln vmaxScale)',
    ],
    ['zero measurement sd', { ...base, batches: [{ ...batch, measurementSdGPerL: 0 }] }, 'batches[0].measurementSdGPerL: must be > 0'],
    ['negative product', { ...base, batches: [{ ...batch, measuredProductGPerL: -1 }] }, 'batches[0].measuredProductGPerL: must be >= 0'],
    ['kelvin setpoint', { ...base, batches: [{ ...batch, temperature: { setpointC: 323 } }] }, 'batches[0].temperature.setpointC: must be between -50 and 250'],
    ['kd zero', { ...base, enzyme: { ...enzyme, kdRefPerH: 0 } }, 'enzyme.kdRefPerH: must be > 0 for the calibrate command'],
  ])('%s', (_n, input, message) => {
    expect(ruleOf(() => validateCalibrateInput(input))).toBe(message);
  });
  it('a prior sd of zero is refused (the posterior needs a positive definite prior)', () => {
    expect(ruleOf(() => calibrate({ ...base, covariance: covarianceOf([0.2, 0, 0.2]) }))).toBe('covariance: must be positive definite');
  });

  it('command line: calibrate answers the posterior and one entry per batch', () => {
    const run = spawnSync(process.execPath, ['--import', 'tsx', 'src/cli/model-cli.ts', 'calibrate'], {
      cwd: path.resolve(__dirname, '../..'),
      input: JSON.stringify(base),
      encoding: 'utf8',
    });
    expect(run.status).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(Object.keys(out.posterior).sort()).toEqual(['covariance', 'edKJPerMol', 'kdRefPerH', 'vmaxScale']);
    expect(out.batches).toHaveLength(1);
    expect(out.batches[0].priorForecastGPerL).toBeCloseTo(simulate(enzyme, substrate, 24, { setpointC: 50 }).productGPerL, 10);
    expect(out.modelVersion).toMatch(/^yieldpoint-kinetics/);
  });
});
