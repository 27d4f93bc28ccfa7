// The four defects an outside audit found, each with the input that showed it.
import { describe, expect, it } from 'vitest';
import { cli } from '../support/model';
import { createRng, monteCarlo, optimizeProfile, optimizeSetpoint, simulate, type EnzymeParams, type Stage, type Substrate } from '../../src/model';

// Independent solve of the staged programme: steps parameterised as maxStep * tanh(u), so every u is feasible,
// then gradient ascent (central differences, Adam steps) on ln(work) of simulate from many starts.
function gradientSolve(
  e: EnzymeParams,
  s: Substrate,
  batchH: number,
  [lo, hi]: [number, number],
  n: number,
  step: number,
  startC: number,
  seed: number,
): number {
  const tau = batchH / n;
  const temps = (u: number[]) => {
    const out: Stage[] = [];
    let c = startC;
    for (let i = 0; i < n; i++) {
      c = Math.min(hi, Math.max(lo, c + step * Math.tanh(u[i])));
      out.push({ hours: tau, c });
    }
    return out;
  };
  const f = (u: number[]) => Math.log(simulate(e, s, batchH, { stages: temps(u) }).workGPerL);
  const rng = createRng(seed);
  let best = -Infinity;
  for (let start = 0; start < 4; start++) {
    const u = Array.from({ length: n }, () => 3 * (rng.uniform() - 0.3));
    const m = new Array(n).fill(0);
    const v = new Array(n).fill(0);
    for (let it = 1; it <= 400; it++) {
      const g = u.map((_, i) => {
        const up = [...u];
        const dn = [...u];
        up[i] += 1e-5;
        dn[i] -= 1e-5;
        return (f(up) - f(dn)) / 2e-5;
      });
      for (let i = 0; i < n; i++) {
        m[i] = 0.9 * m[i] + 0.1 * g[i];
        v[i] = 0.999 * v[i] + 0.001 * g[i] * g[i];
        u[i] += (0.05 * (m[i] / (1 - 0.9 ** it))) / (Math.sqrt(v[i] / (1 - 0.999 ** it)) + 1e-12);
      }
    }
    best = Math.max(best, simulate(e, s, batchH, { stages: temps(u) }).workGPerL);
  }
  return best;
}

// Every "ramp by the full step, then hold" and "hold, then ramp" program from startC.
function fullStepRamps(n: number, tau: number, startC: number, step: number, [lo, hi]: [number, number]): Stage[][] {
  const out: Stage[][] = [];
  for (let k = 0; k <= n; k++)
    for (const dir of [1, -1]) {
      out.push(Array.from({ length: n }, (_, i) => ({ hours: tau, c: Math.min(hi, Math.max(lo, startC + dir * step * Math.min(i + 1, k))) })));
      out.push(Array.from({ length: n }, (_, i) => ({ hours: tau, c: Math.min(hi, Math.max(lo, startC + dir * step * Math.max(0, i + 1 - (n - k)))) })));
    }
  return out;
}

describe('staged profile never falls short when the step limit binds', () => {
  const audit = {
    enzyme: { tRefC: 60, vmaxRef: 5, eaKJPerMol: 55, kdRefPerH: 0.4, edKJPerMol: 250, equilibrium: { teqC: 62, dHeqKJPerMol: 180 } },
    substrate: { s0GPerL: 120, kmGPerL: 8 },
    batchH: 48,
    boundsC: [40, 75] as [number, number],
    stages: 30,
    maxStepC: 0.3,
    startC: 40.5,
  };
  const p = optimizeProfile(audit.enzyme, audit.substrate, audit.batchH, audit.boundsC, audit.stages, audit.maxStepC, audit.startC);
  it('the audit input: full steps of 0.3 degC (it returned 0.284 degC steps and 81.983 g/L; the ramp makes 82.729)', () => {
    expect(p.stages[0].c - audit.startC).toBeCloseTo(0.3, 9);
    expect(p.productGPerL).toBeGreaterThanOrEqual(82.7289);
  });
  it('is feasible and beats every full-step ramp and hold', () => {
    let prev = audit.startC;
    for (const s of p.stages) {
      expect(Math.abs(s.c - prev)).toBeLessThanOrEqual(audit.maxStepC + 1e-9);
      expect(s.c).toBeGreaterThanOrEqual(40);
      expect(s.c).toBeLessThanOrEqual(75);
      prev = s.c;
    }
    for (const ramp of fullStepRamps(30, 1.6, audit.startC, 0.3, audit.boundsC))
      expect(p.productGPerL).toBeGreaterThanOrEqual(simulate(audit.enzyme, audit.substrate, 48, { stages: ramp }).productGPerL * (1 - 1e-13));
  });
  it('beats an independent gradient solve of the same problem', () => {
    const g = gradientSolve(audit.enzyme, audit.substrate, 48, audit.boundsC, 30, 0.3, audit.startC, 5);
    expect(simulate(audit.enzyme, audit.substrate, 48, { stages: p.stages }).workGPerL).toBeGreaterThanOrEqual(g * (1 - 1e-9));
  });
  const two: EnzymeParams = {
    tRefC: 60,
    vmaxRef: 1,
    eaKJPerMol: 50,
    kdRefPerH: Math.LN2,
    edKJPerMol: 300,
    stableFraction: { share: 0.3, kdRefPerH: 0.05, edKJPerMol: 200 },
  };
  const sub = { s0GPerL: 100, kmGPerL: 5 };
  it.each([
    ['binding step', 12, 0.5, 45],
    ['loose step', 8, 4, 48],
  ])('two fractions (%s): never below the isothermal optimum, full-step ramps or a gradient solve; gap bound holds', (_n, n, step, startC) => {
    const q = optimizeProfile(two, sub, 24, [40, 80], n, step, startC);
    const work = simulate(two, sub, 24, { stages: q.stages }).workGPerL;
    const iso = optimizeSetpoint(two, sub, 24, [Math.max(40, startC - step), startC + step]);
    expect(work).toBeGreaterThanOrEqual(simulate(two, sub, 24, { setpointC: iso.setpointC }).workGPerL * (1 - 1e-12));
    for (const ramp of fullStepRamps(n, 24 / n, startC, step, [40, 80]))
      expect(work).toBeGreaterThanOrEqual(simulate(two, sub, 24, { stages: ramp }).workGPerL * (1 - 1e-12));
    const g = gradientSolve(two, sub, 24, [40, 80], n, step, startC, 9);
    expect(work).toBeGreaterThanOrEqual(g * (1 - 1e-7));
    expect(g).toBeLessThanOrEqual(work * (1 + q.optimalityGapBound! + 1e-9));
  });
});

describe('every output finite, or the input refused with field: rule (exit 2)', () => {
  it('kdRefPerH 0 with a huge Arrhenius factor (it printed residualActivity: null)', () => {
    const r = cli('simulate', {
      enzyme: { tRefC: -50, vmaxRef: 1e6, eaKJPerMol: 1000, kdRefPerH: 0, edKJPerMol: 3000 },
      substrate: { s0GPerL: 100, kmGPerL: 5 },
      batchH: 24,
      temperature: { setpointC: 250 },
    });
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.residualActivity).toBe(1);
    expect(out.productGPerL).toBe(100);
    expect(Number.isFinite(out.workGPerL)).toBe(true);
  });
  it('S0/Km beyond 1e308 is refused (it printed productGPerL: null)', () => {
    const r = cli('simulate', {
      enzyme: { tRefC: 60, vmaxRef: 1, eaKJPerMol: 50, kdRefPerH: 0.1, edKJPerMol: 300 },
      substrate: { s0GPerL: 1e300, kmGPerL: 1e-10 },
      batchH: 24,
      temperature: { setpointC: 50 },
    });
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toBe('substrate.s0GPerL: must be <= 10000\n');
  });
  it.each([
    ['volumeL', 'economics.volumeL: must be <= 100000000'],
    ['productPricePerKg', 'economics.productPricePerKg: must be between 0 and 1000000'],
  ])('economics with %s 1e308 is refused (it printed about 30 nulls)', (key, message) => {
    const economics = { productPricePerKg: 2, volumeL: 1000, enzymeCostPerBatch: 10, heatingCostPerDegCHour: 0.1, ambientC: 20, turnaroundH: 4, [key]: 1e308 };
    const r = cli('economics', {
      enzyme: { tRefC: 60, vmaxRef: 2, eaKJPerMol: 50, kdRefPerH: 0.693, edKJPerMol: 300 },
      substrate: { s0GPerL: 100, kmGPerL: 5 },
      boundsC: [30, 70],
      batchBoundsH: [2, 96],
      economics,
    });
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`${message}\n`);
  });
  it('extreme but valid inputs give finite numbers everywhere (seeded sweep of the accepted ranges)', () => {
    const rng = createRng(77);
    const pick = (lo: number, hi: number) => lo * Math.pow(hi / lo, rng.uniform());
    for (let i = 0; i < 300; i++) {
      const e: EnzymeParams = {
        tRefC: -50 + 300 * rng.uniform(),
        vmaxRef: pick(1e-9, 1e6),
        eaKJPerMol: 1000 * rng.uniform(),
        kdRefPerH: i % 5 === 0 ? 0 : pick(1e-9, 1e6),
        edKJPerMol: 3000 * rng.uniform(),
      };
      if (i % 3 === 0) e.stableFraction = { share: rng.uniform() * 0.98 + 0.01, kdRefPerH: pick(1e-9, 1e6), edKJPerMol: 3000 * rng.uniform() };
      else if (i % 3 === 1) e.equilibrium = { teqC: -50 + 300 * rng.uniform(), dHeqKJPerMol: pick(1, 5000) };
      const s: Substrate = { s0GPerL: pick(1e-9, 1e4), kmGPerL: pick(1e-9, 1e9) };
      if (i % 2) s.kiGPerL = pick(1e-9, 1e9);
      if (i % 4 === 1) s.ksiGPerL = pick(1e-9, 1e9);
      const batchH = pick(1e-3, 1e5);
      const c = -50 + 300 * rng.uniform();
      for (const temp of [
        { setpointC: c },
        {
          log: [
            { h: 0, c: -50 },
            { h: batchH / 2, c: 250 },
            { h: batchH, c },
          ],
        },
      ]) {
        const r = simulate(e, s, batchH, temp);
        for (const v of Object.values(r)) expect(Number.isFinite(v)).toBe(true);
        expect(r.productGPerL).toBeGreaterThanOrEqual(0);
        expect(r.productGPerL).toBeLessThanOrEqual(s.s0GPerL);
      }
      const o = optimizeSetpoint(e, s, batchH, [-50, 250]);
      for (const v of [o.setpointC, o.productGPerL, o.residualActivity]) expect(Number.isFinite(v)).toBe(true);
    }
  });
});

describe('misspelt keys are refused, naming the key', () => {
  const enzyme = { tRefC: 60, vmaxRef: 2, eaKJPerMol: 50, kdRefPerH: 0.693, edKJPerMol: 300 };
  const substrate = { s0GPerL: 100, kmGPerL: 5 };
  it.each([
    [
      'uncertainty',
      {
        enzyme,
        substrate,
        batchH: 24,
        boundsC: [40, 60],
        covariance: [
          [0.001, 0],
          [0, 4],
        ],
        sensorBiasSd: 0.5,
      },
      'sensorBiasSd: is not a known key',
    ],
    [
      'simulate',
      { enzyme: { ...enzyme, equilibirum: { teqC: 60, dHeqKJPerMol: 150 } }, substrate, batchH: 24, temperature: { setpointC: 50 } },
      'enzyme.equilibirum: is not a known key',
    ],
    ['dose', { enzyme, substrate, batchH: 24, log: [{ h: 0, c: 20 }], plan: { setpointC: 50 }, refc: 55 }, 'refc: is not a known key'],
    ['simulate', { enzyme, substrate: { ...substrate, kiGperL: 3 }, batchH: 24, temperature: { setpointC: 50 } }, 'substrate.kiGperL: is not a known key'],
  ])('%s refuses the misspelt key', (command, input, start) => {
    const r = cli(command, input);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.startsWith(start)).toBe(true);
  });
});

describe('robust setpoint searches the bounds', () => {
  // kd chosen so that the nominal optimum sits near 61 degC for a 24 h batch.
  const enzyme = { tRefC: 60, vmaxRef: 2, eaKJPerMol: 50, kdRefPerH: 0.009, edKJPerMol: 300 };
  const base = {
    enzyme,
    substrate: { s0GPerL: 150, kmGPerL: 10 },
    batchH: 24,
    boundsC: [55, 75] as [number, number],
    covariance: [
      [0.04, 0.4],
      [0.4, 100],
    ],
    sensorBiasSdC: 0.5,
    draws: 4000,
    seed: 3,
  };
  it('candidates 62..68 in bounds 55..75: the result is the best P10 over the whole bounds (it returned 62.0)', () => {
    const r = monteCarlo({ ...base, candidatesC: [62, 63, 64, 65, 66, 67, 68] });
    // Same seed, same draws: a dense grid of candidates over the bounds is an independent scan of the P10 curve.
    const dense = monteCarlo({ ...base, candidatesC: Array.from({ length: 101 }, (_, i) => 55 + 0.2 * i) });
    const bestDense = Math.max(...dense.candidates.map((c) => c.p10));
    expect(r.robust!.setpointC).toBeLessThan(62);
    expect(r.robust!.p10).toBeGreaterThanOrEqual(bestDense * (1 - 1e-6));
  });
  it('doseRelSd is the relative sd of the dose: P90/P10 of a dose-proportional product matches a log-normal of that sd/mean', () => {
    // Saturating substrate and low conversion: product = work, proportional to the dose.
    const r = monteCarlo({
      ...base,
      substrate: { s0GPerL: 1e4, kmGPerL: 1e-6 },
      covariance: [
        [0, 0],
        [0, 0],
      ],
      sensorBiasSdC: 0,
      doseRelSd: 0.3,
      draws: 20000,
      candidatesC: [60],
    });
    const sigma = Math.sqrt(Math.log(1 + 0.09));
    const z90 = 1.2815515655446004;
    expect(Math.log(r.candidates[0].p90 / r.candidates[0].p10)).toBeCloseTo(2 * z90 * sigma, 1);
    // Mean 1: the median sits exp(-sigma^2 / 2) below the nominal.
    const nominal = simulate(enzyme, { s0GPerL: 1e4, kmGPerL: 1e-6 }, 24, { setpointC: 60 }).productGPerL;
    expect(r.candidates[0].p50 / nominal).toBeCloseTo(Math.exp(-0.5 * sigma * sigma), 2);
  });
  it('limits candidates and draws x candidates with a stated rule', () => {
    const r = cli('uncertainty', { ...base, draws: 1000000, candidatesC: [60, 61] });
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('draws: draws x (candidates + 32) must be <= 5000000\n');
  });
});
