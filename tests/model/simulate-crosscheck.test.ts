// The closed form and ramp quadrature against the raw ODE integrated by general-purpose libraries
// (odex, mathjs solveODE) on seeded random parameter sets across the practical range.
import * as mathjs from 'mathjs';
import { describe, expect, it } from 'vitest';
import { createRng, simulate, trajectory, type EnzymeParams, type Substrate, type TemperatureInput } from '../../src/model';
import { odexReference, rawRates } from './reference';

// mathjs ships solveODE but its type declarations omit it.
type OdeFn = (t: number, y: number[]) => number[];
const solveODE = (mathjs as unknown as { solveODE: (f: OdeFn, span: number[], y0: number[], o: object) => { y: number[][] } }).solveODE;

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

interface Case {
  enzyme: EnzymeParams;
  substrate: Substrate;
  batchH: number;
}

// Ea 20-120, Ed 100-900 kJ/mol, Km/S0 1e-3..1e3, batch 0.5-200 h; kd*batch and V*batch/S0 spread over decades.
function randomCase(rng: ReturnType<typeof createRng>): Case {
  const logU = (lo: number, hi: number) => Math.exp(Math.log(lo) + (Math.log(hi) - Math.log(lo)) * rng.uniform());
  const batchH = logU(0.5, 200);
  const s0 = logU(1, 500);
  const km = s0 * logU(1e-3, 1e3);
  return {
    enzyme: {
      tRefC: 30 + 40 * rng.uniform(),
      vmaxRef: (s0 * logU(1e-3, 30)) / batchH,
      eaKJPerMol: 20 + 100 * rng.uniform(),
      kdRefPerH: logU(1e-3, 10) / batchH,
      edKJPerMol: 100 + 800 * rng.uniform(),
    },
    substrate: { s0GPerL: s0, kmGPerL: km },
    batchH,
  };
}

function randomTemperature(rng: ReturnType<typeof createRng>, c: Case, kind: number): TemperatureInput {
  const t = c.enzyme.tRefC;
  // Keep within +-4 K of Tref so Ed 900 kJ/mol stays integrable by an explicit reference solver.
  const pick = () => t - 4 + 8 * rng.uniform();
  if (kind === 0) return { setpointC: pick() };
  if (kind === 1) {
    const n = 2 + Math.floor(6 * rng.uniform());
    return { stages: Array.from({ length: n }, () => ({ hours: c.batchH / n, c: pick() })) };
  }
  const n = 3 + Math.floor(10 * rng.uniform());
  const log = [{ h: 0, c: pick() }];
  for (let i = 1; i < n; i++) log.push({ h: log[i - 1].h + (c.batchH / n) * (0.2 + 1.6 * rng.uniform()), c: pick() });
  return { log };
}

describe('simulate vs odex on the raw ODE (seeded random sets)', () => {
  const rng = createRng(20240611);
  const cases = Array.from({ length: 60 }, (_, i) => {
    const c = randomCase(rng);
    return { i, kind: i % 3, c, temp: randomTemperature(rng, c, i % 3) };
  });
  it.each(cases)('case $i (kind $kind): product and activity within 1e-8 relative', ({ c, temp }) => {
    const sim = simulate(c.enzyme, c.substrate, c.batchH, temp);
    const ref = odexReference(c.enzyme, c.substrate, c.batchH, temp);
    expect(rel(sim.productGPerL, ref.product)).toBeLessThan(1e-8);
    expect(rel(sim.residualActivity, ref.activity)).toBeLessThan(1e-8);
  });
});

describe('Equilibrium Model vs odex (seeded random sets)', () => {
  const rng = createRng(5150);
  const cases = Array.from({ length: 12 }, (_, i) => {
    const c = randomCase(rng);
    c.enzyme.equilibrium = { teqC: c.enzyme.tRefC - 3 + 6 * rng.uniform(), dHeqKJPerMol: 80 + 300 * rng.uniform() };
    return { i, kind: i % 3, c, temp: randomTemperature(rng, c, i % 3) };
  });
  it.each(cases)('case $i (kind $kind): product and activity within 1e-8 relative', ({ c, temp }) => {
    const sim = simulate(c.enzyme, c.substrate, c.batchH, temp);
    const ref = odexReference(c.enzyme, c.substrate, c.batchH, temp);
    expect(rel(sim.productGPerL, ref.product)).toBeLessThan(1e-8);
    expect(rel(sim.residualActivity, ref.activity)).toBeLessThan(1e-8);
  });
});

describe('logged history: 1-minute readings, reading by reading', () => {
  it('48 h log of a wandering temperature agrees with odex within 1e-9', () => {
    const rng = createRng(7);
    const log = [];
    let c = 50;
    for (let m = 0; m <= 48 * 60; m++) {
      c += 0.05 * rng.normal();
      log.push({ h: m / 60, c });
    }
    const e = { tRefC: 50, vmaxRef: 3, eaKJPerMol: 55, kdRefPerH: 0.03, edKJPerMol: 280 };
    const s = { s0GPerL: 150, kmGPerL: 12 };
    const sim = simulate(e, s, 48, { log });
    const ref = odexReference(e, s, 48, { log });
    expect(rel(sim.productGPerL, ref.product)).toBeLessThan(1e-9);
    expect(rel(sim.residualActivity, ref.activity)).toBeLessThan(1e-9);
  });
  it('steep ramps (20 -> 75 degC in 1 h, Ed 300) stay within 1e-9', () => {
    const e = { tRefC: 60, vmaxRef: 2, eaKJPerMol: 50, kdRefPerH: Math.LN2, edKJPerMol: 300 };
    const s = { s0GPerL: 100, kmGPerL: 5 };
    const log = [
      { h: 0, c: 20 },
      { h: 1, c: 75 },
      { h: 2, c: 40 },
      { h: 8, c: 58 },
    ];
    const sim = simulate(e, s, 10, { log });
    const ref = odexReference(e, s, 10, { log });
    expect(rel(sim.productGPerL, ref.product)).toBeLessThan(1e-9);
    expect(rel(sim.residualActivity, ref.activity)).toBeLessThan(1e-9);
  });
});

describe('simulate vs mathjs solveODE', () => {
  const rng = createRng(99);
  const cases = Array.from({ length: 8 }, (_, i) => ({ i, c: randomCase(rng) }));
  it.each(cases)('case $i: isothermal product within 1e-7 relative of RK45 at tight absolute tolerance', ({ c }) => {
    const setpoint = c.enzyme.tRefC - 2;
    const { v, k } = rawRates(c.enzyme, setpoint);
    const { s0GPerL: s0, kmGPerL: km } = c.substrate;
    // Scaled state (P/S0, a) so mathjs's absolute tolerance acts as a relative one.
    const sol = solveODE((_t: number, y: number[]) => [((v / s0) * y[1] * (1 - y[0])) / (km / s0 + 1 - y[0]), -k * y[1]], [0, c.batchH], [0, 1], {
      tol: 1e-13,
      maxIter: 1e6,
    });
    const last = sol.y[sol.y.length - 1];
    const sim = simulate(c.enzyme, c.substrate, c.batchH, { setpointC: setpoint });
    expect(Math.abs(sim.productGPerL / s0 - last[0])).toBeLessThan(1e-9 + 1e-7 * last[0]);
  });
});

describe('extremes give finite, sensible numbers', () => {
  const e = { tRefC: 50, vmaxRef: 5, eaKJPerMol: 60, kdRefPerH: 0.1, edKJPerMol: 300 };
  it.each([
    ['kd -> 0', { ...e, kdRefPerH: 1e-300 }, { s0GPerL: 100, kmGPerL: 10 }, 10],
    ['kd = 0', { ...e, kdRefPerH: 0 }, { s0GPerL: 100, kmGPerL: 10 }, 10],
    ['Km >> S0', e, { s0GPerL: 1e-3, kmGPerL: 1e6 }, 10],
    ['Km << S0', e, { s0GPerL: 1e4, kmGPerL: 1e-6 }, 10],
    ['conversion -> 1', { ...e, vmaxRef: 1e6 }, { s0GPerL: 100, kmGPerL: 10 }, 200],
    ['huge (S0 - X)/Km', e, { s0GPerL: 1e6, kmGPerL: 1e-3 }, 1],
    ['enzyme gone at once', { ...e, kdRefPerH: 1e12 }, { s0GPerL: 100, kmGPerL: 10 }, 5],
  ] as const)('%s', (_name, enzyme, substrate, batchH) => {
    const r = simulate(enzyme, substrate, batchH, { setpointC: 55 });
    for (const v of Object.values(r)) expect(Number.isFinite(v)).toBe(true);
    expect(r.productGPerL).toBeGreaterThanOrEqual(0);
    expect(r.productGPerL).toBeLessThanOrEqual(substrate.s0GPerL);
    expect(r.residualActivity).toBeGreaterThanOrEqual(0);
    expect(r.residualActivity).toBeLessThanOrEqual(1);
  });
  it('conversion -> 1 leaves a substrate that matches the integrated equation', () => {
    const s = { s0GPerL: 100, kmGPerL: 10 };
    const r = simulate({ ...e, kdRefPerH: 0 }, s, 1, { setpointC: 50 });
    const left = s.s0GPerL - r.productGPerL;
    // Km ln(S0/S) + (S0 - S) = X with X = 5 g/L/h x 1 h.
    expect(Math.abs(s.kmGPerL * Math.log(s.s0GPerL / left) + r.productGPerL - 5)).toBeLessThan(1e-9);
  });
  it('low conversion keeps full relative precision (product ~ X S0/(Km+S0))', () => {
    const s = { s0GPerL: 100, kmGPerL: 10 };
    const x = 1e-12;
    const r = simulate({ ...e, vmaxRef: x, kdRefPerH: 0, tRefC: 55 }, s, 1, { setpointC: 55 });
    expect(rel(r.productGPerL, (x * 100) / 110)).toBeLessThan(1e-12);
  });
  it('a trajectory ends where simulate ends and starts at zero product', () => {
    const log = {
      log: [
        { h: 0, c: 30 },
        { h: 2, c: 55 },
        { h: 20, c: 57 },
      ],
    };
    const tr = trajectory(e, { s0GPerL: 100, kmGPerL: 10 }, 24, log, 49);
    const sim = simulate(e, { s0GPerL: 100, kmGPerL: 10 }, 24, log);
    expect(tr).toHaveLength(49);
    expect(tr[0].productGPerL).toBe(0);
    expect(rel(tr[48].productGPerL, sim.productGPerL)).toBeLessThan(1e-12);
    expect(tr[24].c).toBeCloseTo(55 + (2 * 10) / 18, 10);
  });
  it('continuing from a saved state equals simulating in one go', () => {
    const s = { s0GPerL: 100, kmGPerL: 10 };
    const first = simulate(e, s, 6, { setpointC: 52 });
    const rest = simulate(e, s, 18, { setpointC: 56 }, { workGPerL: first.workGPerL, activity: first.residualActivity });
    const whole = simulate(e, s, 24, {
      stages: [
        { hours: 6, c: 52 },
        { hours: 18, c: 56 },
      ],
    });
    expect(rel(rest.productGPerL, whole.productGPerL)).toBeLessThan(1e-13);
  });
});
