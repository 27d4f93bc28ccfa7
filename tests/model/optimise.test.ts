import { describe, expect, it } from 'vitest';
import { createRng, lambertWm1, optimizeProfile, optimizeSetpoint, simulate, stagesWithRamps, workOfStages, type EnzymeParams } from '../../src/model';

const saturating = { s0GPerL: 1e9, kmGPerL: 1e-6 };
const case14: EnzymeParams = { tRefC: 60, vmaxRef: 1, eaKJPerMol: 50, kdRefPerH: Math.LN2, edKJPerMol: 300 };

// Dense scan of the engine's own simulate (no closed form involved) refined by golden section on ln(product).
function bruteForceSetpoint(e: EnzymeParams, s: { s0GPerL: number; kmGPerL: number }, batchH: number, lo: number, hi: number) {
  const f = (c: number) => Math.log(simulate(e, s, batchH, { setpointC: c }).workGPerL);
  let best = lo;
  for (let c = lo; c <= hi + 1e-9; c += 0.05) if (f(c) > f(best)) best = c;
  let a = Math.max(lo, best - 0.05);
  let b = Math.min(hi, best + 0.05);
  const g = 0.6180339887498949;
  for (let i = 0; i < 80; i++) {
    const x1 = b - g * (b - a);
    const x2 = a + g * (b - a);
    if (f(x1) >= f(x2)) b = x2;
    else a = x1;
  }
  return 0.5 * (a + b);
}

describe('isothermal optimum', () => {
  const rng = createRng(11);
  const cases = Array.from({ length: 12 }, (_, i) => ({
    i,
    e: {
      tRefC: 40 + 30 * rng.uniform(),
      vmaxRef: 1 + 5 * rng.uniform(),
      eaKJPerMol: 20 + 100 * rng.uniform(),
      kdRefPerH: Math.exp(-4 + 4 * rng.uniform()),
      edKJPerMol: 150 + 700 * rng.uniform(),
    },
    batchH: 0.5 + 100 * rng.uniform(),
  }));
  it.each(cases)('case $i: closed form (W-1) matches a brute-force search within 0.001 degC', ({ e, batchH }) => {
    const o = optimizeSetpoint(e, saturating, batchH, [-40, 200]);
    expect(o.atBound).toBeNull();
    expect(Math.abs(o.setpointC - bruteForceSetpoint(e, saturating, batchH, -40, 200))).toBeLessThan(0.001);
  });
  it('the optimum leaves exp(-u*) of the activity whatever the batch (science.md, isothermal optimum)', () => {
    const a = optimizeSetpoint(case14, saturating, 6, [0, 100]).residualActivity;
    const b = optimizeSetpoint(case14, saturating, 96, [0, 100]).residualActivity;
    expect(a).toBeCloseTo(0.7017, 4);
    expect(b).toBeCloseTo(0.7017, 4);
  });
  it('does not depend on Km or S0 (product rises with work alone)', () => {
    const x = optimizeSetpoint(case14, { s0GPerL: 50, kmGPerL: 200 }, 24, [0, 100]).setpointC;
    const y = optimizeSetpoint(case14, { s0GPerL: 5, kmGPerL: 0.01 }, 24, [0, 100]).setpointC;
    expect(Math.abs(x - y)).toBeLessThan(1e-9);
  });
  it.each([
    ['upper', [20, 40] as [number, number], 40],
    ['lower', [55, 80] as [number, number], 55],
  ])('reports a %s boundary optimum', (side, bounds, expected) => {
    const o = optimizeSetpoint(case14, saturating, 24, bounds);
    expect(o.atBound).toBe(side);
    expect(o.setpointC).toBe(expected);
  });
  it('Ea >= Ed: hotter is always better, so the upper bound', () => {
    const o = optimizeSetpoint({ ...case14, eaKJPerMol: 300, edKJPerMol: 200 }, saturating, 24, [20, 70]);
    expect(o.atBound).toBe('upper');
  });
  it('no inactivation: upper bound', () => {
    expect(optimizeSetpoint({ ...case14, kdRefPerH: 0 }, saturating, 24, [20, 70]).setpointC).toBe(70);
  });
  it('Equilibrium Model (Brent) matches a brute-force search within 0.001 degC', () => {
    const e = { ...case14, equilibrium: { teqC: 52, dHeqKJPerMol: 200 } };
    const o = optimizeSetpoint(e, { s0GPerL: 100, kmGPerL: 10 }, 12, [20, 80]);
    expect(Math.abs(o.setpointC - bruteForceSetpoint(e, saturating, 12, 20, 80))).toBeLessThan(0.001);
  });
  it('at full conversion it still finds the work optimum (maximises ln X, not the flat product)', () => {
    const o = optimizeSetpoint({ ...case14, vmaxRef: 1000 }, { s0GPerL: 10, kmGPerL: 1 }, 24, [0, 100]);
    expect(Math.abs(o.setpointC - 48.565)).toBeLessThan(0.001);
  });
  it('W-1 lower branch satisfies w e^w = x and w <= -1 ([C] definition)', () => {
    for (const x of [-0.3678794411714423, -0.3, -0.1, -1e-5, -1e-200]) {
      const w = lambertWm1(x);
      expect(w).toBeLessThanOrEqual(-1);
      expect(Math.abs((w * Math.exp(w)) / x - 1)).toBeLessThan(1e-12);
    }
  });
});

describe('staged profile', () => {
  // Pontryagin reference, independent of the DP: T(t) maximises v - lambda k, lambda' = -(v - lambda k), lambda(tf) = 0.
  function pontryaginGain(e: EnzymeParams, tf: number, loC: number, hiC: number): number {
    const K = 273.15;
    const Rg = 8.314462618;
    const ea = e.eaKJPerMol * 1000;
    const ed = e.edKJPerMol * 1000;
    const tr = e.tRefC + K;
    const v = (t: number) => e.vmaxRef * Math.exp(-(ea / Rg) * (1 / t - 1 / tr));
    const k = (t: number) => e.kdRefPerH * Math.exp(-(ed / Rg) * (1 / t - 1 / tr));
    const topt = (l: number) => {
      if (l <= 0) return hiC + K;
      const invT = 1 / tr + (Math.log(((l * ed) / ea) * (e.kdRefPerH / e.vmaxRef)) * Rg) / (ed - ea);
      return Math.min(hiC + K, Math.max(loC + K, 1 / invT));
    };
    const n = 20000;
    const h = tf / n;
    const lam = new Float64Array(n + 1);
    const f = (l: number) => -(v(topt(l)) - l * k(topt(l)));
    for (let i = n; i > 0; i--) {
      const l = lam[i];
      const k1 = f(l);
      const k2 = f(l - (h / 2) * k1);
      const k3 = f(l - (h / 2) * k2);
      const k4 = f(l - h * k3);
      lam[i - 1] = l - (h / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
    }
    let a = 1;
    let x = 0;
    const g = (t: number, aa: number) => {
      const i = Math.min(n - 1, Math.floor(t / h));
      const fr = t / h - i;
      const tt = topt(lam[i] * (1 - fr) + lam[i + 1] * fr);
      return [v(tt) * aa, -k(tt) * aa];
    };
    for (let i = 0; i < n; i++) {
      const t = i * h;
      const k1 = g(t, a);
      const k2 = g(t + h / 2, a + (h / 2) * k1[1]);
      const k3 = g(t + h / 2, a + (h / 2) * k2[1]);
      const k4 = g(t + h, a + h * k3[1]);
      x += (h / 6) * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]);
      a += (h / 6) * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1]);
    }
    const iso = optimizeSetpoint(e, saturating, tf, [loC, hiC]);
    return x / iso.productGPerL - 1;
  }

  it('case 16: staged gains rise towards the continuous (Pontryagin) optimum from below as stages are added', () => {
    const cont = pontryaginGain(case14, 24, 40, 80);
    const gains = [6, 24, 96].map((n) => optimizeProfile(case14, saturating, 24, [40, 80], n, 40).gainFraction);
    expect(gains[0]).toBeLessThan(gains[1]);
    expect(gains[1]).toBeLessThan(gains[2]);
    expect(gains[2]).toBeLessThan(cont);
    expect(cont - gains[2]).toBeLessThan(0.001);
    expect(gains[1]).toBeGreaterThan(0.044);
  });
  it('rises through the batch (science.md: interior arc rises, last stage hottest)', () => {
    const p = optimizeProfile(case14, saturating, 24, [40, 80], 12, 40);
    for (let i = 1; i < p.stages.length; i++) expect(p.stages[i].c).toBeGreaterThanOrEqual(p.stages[i - 1].c - 1e-9);
  });
  it('respects bounds, the step limit and the start temperature', () => {
    const p = optimizeProfile(case14, saturating, 24, [45, 52], 24, 0.5, 44.8);
    expect(Math.abs(p.stages[0].c - 44.8)).toBeLessThanOrEqual(0.5 + 1e-9);
    for (const s of p.stages) {
      expect(s.c).toBeGreaterThanOrEqual(45);
      expect(s.c).toBeLessThanOrEqual(52);
    }
    for (let i = 1; i < p.stages.length; i++) expect(Math.abs(p.stages[i].c - p.stages[i - 1].c)).toBeLessThanOrEqual(0.5 + 1e-9);
  });
  it('each stage is locally optimal: nudging any stage by 0.01 degC does not increase the work', () => {
    const p = optimizeProfile(case14, saturating, 24, [40, 80], 8, 40);
    const base = workOfStages(case14, p.stages);
    for (let i = 0; i < p.stages.length; i++)
      for (const d of [-0.01, 0.01]) {
        const moved = p.stages.map((s, j) => (j === i ? { ...s, c: s.c + d } : s));
        expect(workOfStages(case14, moved)).toBeLessThanOrEqual(base * (1 + 1e-12));
      }
  });
  it('a step limit of zero gives back the isothermal optimum', () => {
    const p = optimizeProfile(case14, saturating, 24, [40, 80], 6, 0);
    expect(Math.abs(p.gainFraction)).toBeLessThan(1e-12);
    expect(p.stages.every((s) => Math.abs(s.c - p.isothermal.setpointC) < 1e-9)).toBe(true);
  });
});

describe('stagesWithRamps', () => {
  it('adds heating and cooling ramps at the vessel limits and keeps the stage clock', () => {
    const log = stagesWithRamps(
      [
        { hours: 2, c: 50 },
        { hours: 3, c: 40 },
      ],
      20,
      60,
      20,
    );
    expect(log).toEqual([
      { h: 0, c: 20 },
      { h: 0.5, c: 50 },
      { h: 2, c: 50 },
      { h: 2.5, c: 40 },
      { h: 5, c: 40 },
    ]);
  });
  it('a ramp longer than its stage carries on into the next stage from where it got to', () => {
    const log = stagesWithRamps(
      [
        { hours: 1, c: 80 },
        { hours: 1, c: 80 },
      ],
      20,
      40,
      40,
    );
    expect(log[1]).toEqual({ h: 1, c: 60 });
    expect(log[2]).toEqual({ h: 1.5, c: 80 });
  });
  it('a planned profile with ramps makes less than the ideal steps when starting cold', () => {
    const stages = [
      { hours: 12, c: 47 },
      { hours: 12, c: 50 },
    ];
    const ideal = simulate(case14, saturating, 24, { stages }).productGPerL;
    const real = simulate(case14, saturating, 24, { log: stagesWithRamps(stages, 20, 10, 10) }).productGPerL;
    expect(real).toBeLessThan(ideal);
  });
});
