// Engine benchmark: median time per operation, accuracy against a tight reference, and speed ratio to two peers
// run in the same process (fixed-step 1 s explicit Euler on the raw ODE; mathjs solveODE at a tolerance reaching 1e-8).
// Run: npx tsx tests/bench/model-bench.ts
import * as mathjs from 'mathjs';
import { createRequire } from 'node:module';
import os from 'node:os';
import path from 'node:path';
import {
  arrheniusFactor,
  calibrate as calibrateImported,
  createRng,
  fitInactivation as fitInactivationImported,
  monteCarlo as monteCarloImported,
  optimizeProfile as optimizeProfileImported,
  optimizeSetpoint as optimizeSetpointImported,
  simulate as simulateImported,
  type EnzymeParams,
  type Substrate,
  type TemperatureInput,
} from '../../src/model';

type OdeFn = (t: number, y: number[]) => number[];
// By file path: tsx applies tsconfig "paths", which point 'odex' at a type declaration.
const { Solver } = createRequire(__filename)(path.resolve(__dirname, '../../node_modules/odex/src/odex.js')) as typeof import('odex');
const solveODE = (mathjs as unknown as { solveODE: (f: OdeFn, span: number[], y0: number[], o: object) => { y: number[][] } }).solveODE;

// Local bindings: under tsx each call to an imported function goes through a getter; time the engine, not that.
const simulate = simulateImported;
const optimizeSetpoint = optimizeSetpointImported;
const optimizeProfile = optimizeProfileImported;
const monteCarlo = monteCarloImported;
const fitInactivation = fitInactivationImported;
const calibrate = calibrateImported;

const K = 273.15;
const GAS = 8.314462618;
const enzyme: EnzymeParams = { tRefC: 60, vmaxRef: 8, eaKJPerMol: 50, kdRefPerH: Math.LN2, edKJPerMol: 300 };
const substrate: Substrate = { s0GPerL: 200, kmGPerL: 15 };
const batchH = 24;

let sink = 0;

// CPU seconds per call of each median (keyed by the wall median it returned): on a shared machine the process's own
// CPU time is the steadier figure, since wall time also counts the waits for a core.
const cpuOf = new Map<number, number>();

/** Median wall seconds per call over `reps` timed batches of `inner` calls (its median CPU seconds in cpuOf). */
function median(fn: () => number, inner: number, reps = 9): number {
  for (let i = 0; i < Math.min(inner, 1000); i++) sink += fn();
  const times: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < reps; r++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    for (let i = 0; i < inner; i++) sink += fn();
    times.push((performance.now() - t0) / 1000 / inner);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1e6 / inner);
  }
  times.sort((a, b) => a - b);
  cpu.sort((a, b) => a - b);
  const wall = times[Math.floor(times.length / 2)];
  cpuOf.set(wall, cpu[Math.floor(cpu.length / 2)]);
  return wall;
}

function rates(c: number) {
  const t = c + K;
  const tr = enzyme.tRefC + K;
  return {
    v: enzyme.vmaxRef * Math.exp(-((enzyme.eaKJPerMol * 1000) / GAS) * (1 / t - 1 / tr)),
    k: enzyme.kdRefPerH * Math.exp(-((enzyme.edKJPerMol * 1000) / GAS) * (1 / t - 1 / tr)),
  };
}

function tempAt(temp: TemperatureInput, h: number): number {
  if ('setpointC' in temp) return temp.setpointC;
  if ('stages' in temp) {
    let t = 0;
    for (const s of temp.stages) {
      t += s.hours;
      if (h < t) return s.c;
    }
    return temp.stages[temp.stages.length - 1].c;
  }
  const log = temp.log;
  if (h <= log[0].h) return log[0].c;
  for (let i = 1; i < log.length; i++) if (h <= log[i].h) return log[i - 1].c + ((log[i].c - log[i - 1].c) * (h - log[i - 1].h)) / (log[i].h - log[i - 1].h);
  return log[log.length - 1].c;
}

function knotsOf(temp: TemperatureInput, end: number): number[] {
  if ('setpointC' in temp) return [end];
  if ('stages' in temp) {
    const ks: number[] = [];
    let t = 0;
    for (const s of temp.stages) ks.push((t += s.hours));
    return [...ks.filter((k) => k < end), end];
  }
  return [...temp.log.map((r) => r.h).filter((h) => h > 0 && h < end), end];
}

/** Tight reference: odex (GBS extrapolation) at rtol 1e-14, restarted at every corner of the program. */
function reference(temp: TemperatureInput, end = batchH): number {
  const s = new Solver(2);
  s.relativeTolerance = 1e-14;
  s.absoluteTolerance = 1e-300;
  s.maxSteps = 1e7;
  let y = [0, 1];
  let t = 0;
  for (const kt of knotsOf(temp, end)) {
    const mid = tempAt(temp, 0.5 * (t + kt));
    const f = (h: number, yy: number[]) => {
      const { v, k } = rates('log' in temp ? tempAt(temp, h) : mid);
      const left = substrate.s0GPerL - yy[0];
      return [(v * yy[1] * left) / (substrate.kmGPerL + left), -k * yy[1]];
    };
    y = s.solve(f, t, y, kt).y;
    t = kt;
  }
  return y[0];
}

/** Peer 1: explicit Euler with a fixed 1 s step, rates evaluated every step. */
function fixedStep(temp: TemperatureInput, end = batchH): number {
  const dt = 1 / 3600;
  const n = Math.round(end / dt);
  let p = 0;
  let a = 1;
  let j = 1;
  for (let i = 0; i < n; i++) {
    const h = i * dt;
    let c: number;
    if ('log' in temp) {
      // Walk the readings forward instead of searching from the start at every step.
      const log = temp.log;
      while (j < log.length - 1 && log[j].h < h) j++;
      const r0 = log[j - 1];
      const r1 = log[j];
      c = h <= r0.h ? r0.c : h >= r1.h ? r1.c : r0.c + ((r1.c - r0.c) * (h - r0.h)) / (r1.h - r0.h);
    } else c = tempAt(temp, h);
    const { v, k } = rates(c);
    const left = substrate.s0GPerL - p;
    p += dt * ((v * a * left) / (substrate.kmGPerL + left));
    a -= dt * k * a;
  }
  return p;
}

/** Peer 2: mathjs solveODE (RK45, absolute tolerance) on the scaled state, corner by corner. */
function mathjsSolve(temp: TemperatureInput, tol: number, end = batchH): number {
  let y = [0, 1];
  let t = 0;
  for (const kt of knotsOf(temp, end)) {
    const mid = tempAt(temp, 0.5 * (t + kt));
    const f = (h: number, yy: number[]) => {
      const { v, k } = rates('log' in temp ? tempAt(temp, h) : mid);
      return [((v / substrate.s0GPerL) * yy[1] * (1 - yy[0])) / (substrate.kmGPerL / substrate.s0GPerL + 1 - yy[0]), -k * yy[1]];
    };
    const sol = solveODE(f, [t, kt], y, { tol, maxIter: 1e7 });
    y = sol.y[sol.y.length - 1];
    t = kt;
  }
  return y[0] * substrate.s0GPerL;
}

function tolFor(temp: TemperatureInput, ref: number): number {
  for (const tol of [1e-8, 1e-9, 1e-10, 1e-11, 1e-12, 1e-13]) if (Math.abs(mathjsSolve(temp, tol) / ref - 1) < 1e-8) return tol;
  return 1e-13;
}

function goldenMax(f: (c: number) => number, lo: number, hi: number, tol: number): { x: number; evals: number } {
  const g = 0.6180339887498949;
  let a = lo;
  let b = hi;
  let x1 = b - g * (b - a);
  let x2 = a + g * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  let evals = 2;
  while (b - a > tol) {
    if (f1 >= f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - g * (b - a);
      f1 = f(x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + g * (b - a);
      f2 = f(x2);
    }
    evals++;
  }
  return { x: 0.5 * (a + b), evals };
}

function once(fn: () => number): number {
  const t0 = performance.now();
  sink += fn();
  return (performance.now() - t0) / 1000;
}

function fmtTime(s: number): string {
  if (s < 1e-6) return `${(s * 1e9).toFixed(0)} ns`;
  if (s < 1e-3) return `${(s * 1e6).toFixed(2)} us`;
  if (s < 1) return `${(s * 1e3).toFixed(2)} ms`;
  return `${s.toFixed(2)} s`;
}

const rows: string[][] = [];
function row(op: string, t: number, target: string, accuracy: string, fixed?: number, mj?: number) {
  const cpu = cpuOf.get(t);
  rows.push([
    op,
    fmtTime(t),
    cpu === undefined ? '-' : fmtTime(cpu),
    target,
    accuracy,
    fixed ? `${(fixed / t).toExponential(2)}x` : '-',
    mj ? `${(mj / t).toExponential(2)}x` : '-',
  ]);
}

const relErr = (a: number, b: number) => Math.abs(a / b - 1).toExponential(1);

// 1. One setpoint.
{
  const temp = { setpointC: 49 };
  const ref = reference(temp);
  const t = median(() => simulate(enzyme, substrate, batchH, temp).productGPerL, 200000);
  const fx = median(() => fixedStep(temp), 1, 5);
  const tol = tolFor(temp, ref);
  const mj = median(() => mathjsSolve(temp, tol), 1, 3);
  row(
    'simulate, one setpoint (24 h)',
    t,
    '< 1 us',
    `rel ${relErr(simulate(enzyme, substrate, batchH, temp).productGPerL, ref)} (Euler 1 s: ${relErr(fixedStep(temp), ref)}; mathjs tol ${tol})`,
    fx,
    mj,
  );
}
// 2. Six stages.
{
  const temp = { stages: [44, 46, 47, 48, 50, 53].map((c) => ({ hours: 4, c })) };
  const ref = reference(temp);
  const t = median(() => simulate(enzyme, substrate, batchH, temp).productGPerL, 100000);
  const fx = median(() => fixedStep(temp), 1, 5);
  const tol = tolFor(temp, ref);
  const mj = median(() => mathjsSolve(temp, tol), 1, 3);
  row('simulate, 6 stages', t, '< 3 us', `rel ${relErr(simulate(enzyme, substrate, batchH, temp).productGPerL, ref)}`, fx, mj);
}
// 3. 48 h log at 1-minute readings.
{
  const rng = createRng(48);
  const log = [];
  let c = 20;
  for (let m = 0; m <= 48 * 60; m++) {
    const target = m < 60 ? 20 + (28 * m) / 60 : 48 + (m / 2880) * 4;
    c += 0.3 * (target - c) + 0.05 * rng.normal();
    log.push({ h: m / 60, c });
  }
  const temp = { log };
  const ref = reference(temp, 48);
  const t = median(() => simulate(enzyme, substrate, 48, temp).productGPerL, 50);
  const fx = median(() => fixedStep(temp, 48), 1, 3);
  row('simulate, 48 h log, 1-min readings', t, '<= 0.5 ms, rel < 1e-9', `rel ${relErr(simulate(enzyme, substrate, 48, temp).productGPerL, ref)}`, fx);
}
// 4. Isothermal optimum.
{
  const o = optimizeSetpoint(enzyme, substrate, batchH, [30, 70]);
  // Reference: golden section on the odex reference's product... product is flat near full conversion, so on work:
  // with saturating substrate the work optimum is the product optimum; use a dense odex search on ln product at low load.
  const sat = { s0GPerL: 1e6, kmGPerL: 1e-3 };
  const refSearch = goldenMax((c) => Math.log(simulateOdexSat(c, sat)), 40, 60, 1e-5);
  const t = median(() => optimizeSetpoint(enzyme, substrate, batchH, [30, 70]).setpointC, 100000);
  const fixedEvals = goldenMax((c) => fixedStep({ setpointC: c }), 30, 70, 1e-3);
  const fx = once(() => goldenMax((c) => fixedStep({ setpointC: c }), 30, 70, 1e-3).x);
  const tol = tolFor({ setpointC: 49 }, reference({ setpointC: 49 }));
  const mj = once(() => goldenMax((c) => mathjsSolve({ setpointC: c }, tol), 30, 70, 1e-3).x);
  row(
    'isothermal optimum (closed form)',
    t,
    '< 5 us',
    `|dT| ${Math.abs(o.setpointC - refSearch.x).toExponential(1)} degC vs odex search (peers: golden section, ${fixedEvals.evals} sims)`,
    fx,
    mj,
  );
}
function simulateOdexSat(c: number, sat: Substrate): number {
  const s = new Solver(2);
  s.relativeTolerance = 1e-13;
  s.absoluteTolerance = 1e-300;
  const { v, k } = rates(c);
  const y = s.solve(
    (_h: number, yy: number[]) => {
      const left = sat.s0GPerL - yy[0];
      return [(v * yy[1] * left) / (sat.kmGPerL + left), -k * yy[1]];
    },
    0,
    [0, 1],
    batchH,
  ).y;
  return y[0];
}
// 5. 24-stage profile with a step limit.
{
  const p = optimizeProfile(enzyme, substrate, batchH, [40, 60], 24, 1);
  const t = median(() => optimizeProfile(enzyme, substrate, batchH, [40, 60], 24, 1).productGPerL, 5, 7);
  row(
    '24-stage profile, step 1 degC',
    t,
    '< 30 ms',
    `gain ${(p.gainFraction * 100).toFixed(3)} % over isothermal; rel ${relErr(p.productGPerL, reference({ stages: p.stages }))} vs odex`,
  );
}
// 6. Monte Carlo.
{
  const input = {
    enzyme,
    substrate,
    batchH,
    boundsC: [40, 60] as [number, number],
    covariance: [
      [0.0004, 0.02],
      [0.02, 4],
    ],
    sensorBiasSdC: 0.3,
    doseRelSd: 0.05,
    draws: 10000,
    seed: 1,
  };
  const a = monteCarlo({ ...input, robust: false });
  const t1 = median(() => monteCarlo({ ...input, robust: false }).optimum.p50, 3, 7);
  row(
    'Monte Carlo 10k: optimum distribution',
    t1,
    '< 20 ms',
    `P10/P50/P90 ${a.optimum.p10.toFixed(3)}/${a.optimum.p50.toFixed(3)}/${a.optimum.p90.toFixed(3)} degC`,
  );
  const b = monteCarlo(input);
  const t2 = median(() => monteCarlo(input).robust!.setpointC, 1, 5);
  row(
    'Monte Carlo 10k: robust (best P10) setpoint',
    t2,
    '< 25 ms',
    `robust ${b.robust!.setpointC.toFixed(3)} degC vs nominal ${b.nominal.setpointC.toFixed(3)}`,
  );
}
// 7. Four-temperature fit.
{
  const pts: { c: number; h: number; residual: number }[] = [];
  for (const c of [55, 60, 65, 70]) for (const h of [0.25, 0.5, 1, 2, 4]) pts.push({ c, h, residual: Math.exp(-0.2 * arrheniusFactor(250, c, 60) * h) });
  const f = fitInactivation(60, pts);
  const t = median(() => fitInactivation(60, pts).kdRefPerH, 200);
  row('fit, 4 temperatures x 5 times', t, '< 2 ms', `noise-free truth: kd rel ${relErr(f.kdRefPerH, 0.2)}, Ed rel ${relErr(f.edKJPerMol, 250)}`);
}
// 8. Calibration from 20 closed 48 h batches logged at 1-minute readings (prior: assay-fit-like spread).
{
  const rng = createRng(20);
  const truth = { ...enzyme, kdRefPerH: enzyme.kdRefPerH * 1.15, edKJPerMol: 296, vmaxRef: enzyme.vmaxRef * 0.88 };
  const batches = Array.from({ length: 20 }, (_, i) => {
    const hold = 46 + (i % 5);
    const log = [];
    let c = 20;
    for (let m = 0; m <= 48 * 60; m++) {
      c += 0.3 * ((m < 60 ? 20 + ((hold - 20) * m) / 60 : hold + m / 1440) - c) + 0.05 * rng.normal();
      log.push({ h: m / 60, c });
    }
    const temperature = { log };
    const p = simulate(truth, substrate, 48, temperature).productGPerL;
    return { batchH: 48, temperature, measuredProductGPerL: p * (1 + 0.02 * rng.normal()), measurementSdGPerL: 0.02 * p };
  });
  const covariance = [
    [0.01, 0.12, 0],
    [0.12, 16, 0],
    [0, 0, 0.04],
  ];
  const input = { enzyme, substrate, covariance, batches };
  const r = calibrate(input);
  const t = median(() => calibrate(input).posterior.vmaxScale, 1, 7);
  const z = Math.max(...r.batches.map((b) => Math.abs(b.standardisedResidual)));
  row(
    'calibrate, 20 closed 48 h batches, 1-min logs',
    t,
    '< 100 ms',
    `${r.iterations} iterations; kd ${relErr(r.posterior.kdRefPerH, truth.kdRefPerH)} off truth, scale ${r.posterior.vmaxScale.toFixed(4)} (truth 0.88), max |z| ${z.toFixed(2)}`,
  );
}

// 9-13. The models of inhibition, two fractions and the three-model fit.
/** odex at rtol 1e-14 on the raw ODE at one temperature: competitive product and substrate inhibition, two fractions. */
function referenceGeneral(e: EnzymeParams, sub: Substrate, c: number, hours: number): number {
  const s = new Solver(3);
  s.relativeTolerance = 1e-14;
  s.absoluteTolerance = 1e-300;
  s.maxSteps = 1e7;
  const t = c + K;
  const tr = e.tRefC + K;
  const arr = (ea: number) => Math.exp(-((ea * 1000) / GAS) * (1 / t - 1 / tr));
  const v = e.vmaxRef * arr(e.eaKJPerMol);
  const k1 = e.kdRefPerH * arr(e.edKJPerMol);
  const sf = e.stableFraction;
  const k2 = sf ? sf.kdRefPerH * arr(sf.edKJPerMol) : 0;
  const ki = sub.kiGPerL ?? Infinity;
  const ksi = sub.ksiGPerL ?? Infinity;
  const y = s.solve(
    (_h: number, yy: number[]) => {
      const left = sub.s0GPerL - yy[0];
      return [(v * (yy[1] + yy[2]) * left) / (sub.kmGPerL * (1 + yy[0] / ki) + left + (left * left) / ksi), -k1 * yy[1], -k2 * yy[2]];
    },
    0,
    [0, 1 - (sf?.share ?? 0), sf?.share ?? 0],
    hours,
  ).y;
  return y[0];
}
{
  const inhibited: Substrate = { ...substrate, kiGPerL: 40, ksiGPerL: 600 };
  const temp = { setpointC: 49 };
  const t = median(() => simulate(enzyme, inhibited, batchH, temp).productGPerL, 200000);
  row(
    'simulate with inhibition (Ki, Ksi), one setpoint',
    t,
    '< 2 us',
    `rel ${relErr(simulate(enzyme, inhibited, batchH, temp).productGPerL, referenceGeneral(enzyme, inhibited, 49, batchH))} vs odex`,
  );
}
const twoFraction: EnzymeParams = { ...enzyme, stableFraction: { share: 0.25, kdRefPerH: 0.05, edKJPerMol: 320 } };
{
  const temp = { setpointC: 49 };
  const t = median(() => simulate(twoFraction, substrate, batchH, temp).productGPerL, 200000);
  row(
    'simulate with two fractions, one setpoint',
    t,
    '< 2 us',
    `rel ${relErr(simulate(twoFraction, substrate, batchH, temp).productGPerL, referenceGeneral(twoFraction, substrate, 49, batchH))} vs odex`,
  );
}
{
  const o = optimizeSetpoint(twoFraction, substrate, batchH, [30, 70]);
  const t = median(() => optimizeSetpoint(twoFraction, substrate, batchH, [30, 70]).setpointC, 2000);
  // Reference: golden section on the odex product in the bracket of a 0.05 degC scan of the engine.
  let best = 30;
  for (let c = 30; c <= 70; c += 0.05)
    if (simulate(twoFraction, substrate, batchH, { setpointC: c }).productGPerL > simulate(twoFraction, substrate, batchH, { setpointC: best }).productGPerL)
      best = c;
  const sat = { s0GPerL: 1e6, kmGPerL: 1e-3 };
  const g = goldenMax((c) => Math.log(referenceGeneral(twoFraction, sat, c, batchH)), best - 0.1, best + 0.1, 1e-6);
  row('two-fraction optimum', t, '< 50 us', `|dT| ${Math.abs(o.setpointC - g.x).toExponential(1)} degC vs odex golden section`);
}
{
  const rng = createRng(100);
  const pts: { c: number; h: number; residual: number }[] = [];
  for (const c of [50, 55, 60, 65, 70])
    for (let j = 1; j <= 20; j++) pts.push({ c, h: 0.25 * j, residual: Math.exp(-0.15 * arrheniusFactor(280, c, 60) * 0.25 * j + 0.05 * rng.normal()) });
  const f = fitInactivation(60, pts);
  const t = median(() => fitInactivation(60, pts).kdRefPerH, 50);
  row(
    'three-model fit, 100 points (5 temperatures x 20 times)',
    t,
    '< 5 ms',
    `chosen ${f.chosen}; kd ${f.kdRefPerH.toFixed(4)} (truth 0.15), Ed ${f.edKJPerMol.toFixed(1)} (truth 280)`,
  );
}

// 14. The three-model fit of a large assay: 100,000 distinct (temperature, time) rows, the fit's limit (one run).
{
  const rng = createRng(3);
  const n = 100_000;
  const pts = Array.from({ length: n }, (_, i) => {
    const c = [50, 55, 60, 65][i % 4];
    const h = 0.5 + (16 * i) / n;
    return { c, h, residual: 0.9 * Math.exp(-0.05 * arrheniusFactor(260, c, 55) * h + 0.04 * rng.normal()) };
  });
  let f = fitInactivation(55, pts);
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  f = fitInactivation(55, pts);
  const wall = (performance.now() - t0) / 1000;
  const c = process.cpuUsage(c0);
  cpuOf.set(wall, (c.user + c.system) / 1e6);
  row(
    'three-model fit, 100,000 distinct rows (one run)',
    wall,
    '-',
    `models ${f.models.map((m) => m.name).join(', ')}; chosen ${f.chosen} (truth: first order, 10 % lost before h = 0)`,
  );
}

const head = ['operation', 'median', 'cpu', 'target', 'accuracy', 'x fixed-step', 'x mathjs'];
const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
const line = (r: string[]) => r.map((c, i) => c.padEnd(widths[i])).join(' | ');
console.log(line(head));
console.log(widths.map((w) => '-'.repeat(w)).join('-|-'));
for (const r of rows) console.log(line(r));
console.log(
  `\nload average ${os
    .loadavg()
    .map((v) => v.toFixed(1))
    .join(' / ')} (1 / 5 / 15 min) on ${os.cpus().length} cores`,
);
if (!Number.isFinite(sink)) console.log('');
