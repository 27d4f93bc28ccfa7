import { ModelInputError } from './errors';
import type { EconomicsParams } from './economics';
import type { InactivationPoint } from './fit';
import type { UncertaintyInput } from './uncertainty';
import type { EnzymeParams, Reading, Stage, Substrate, TemperatureInput } from './types';

/** Temperatures the engine accepts, degC: wide enough for any enzyme process, narrow enough to catch unit slips (K, degF). */
export const TEMPERATURE_RANGE_C: [number, number] = [-50, 250];

type Obj = Record<string, unknown>;

function fail(field: string, rule: string): never {
  throw new ModelInputError(field, rule);
}

function object(v: unknown, field: string): Obj {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) fail(field, 'must be an object');
  return v as Obj;
}

function array(v: unknown, field: string, minLength = 1): unknown[] {
  if (!Array.isArray(v)) fail(field, 'must be an array');
  if (v.length < minLength) fail(field, `must have at least ${minLength} item${minLength === 1 ? '' : 's'}`);
  return v;
}

interface NumRule {
  gt?: number;
  min?: number;
  max?: number;
  integer?: boolean;
}

function number(v: unknown, field: string, rule: NumRule = {}): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) fail(field, 'must be a finite number');
  if (rule.integer && !Number.isInteger(v)) fail(field, 'must be an integer');
  if (rule.gt !== undefined && !(v > rule.gt)) fail(field, `must be > ${rule.gt}`);
  if (rule.min !== undefined && rule.max !== undefined && (v < rule.min || v > rule.max))
    fail(field, `must be between ${rule.min} and ${rule.max}`);
  if (rule.min !== undefined && v < rule.min) fail(field, `must be >= ${rule.min}`);
  if (rule.max !== undefined && v > rule.max) fail(field, `must be <= ${rule.max}`);
  return v;
}

function optionalNumber(v: unknown, field: string, rule: NumRule = {}): number | undefined {
  return v === undefined ? undefined : number(v, field, rule);
}

const TEMP: NumRule = { min: TEMPERATURE_RANGE_C[0], max: TEMPERATURE_RANGE_C[1] };

function temperature(v: unknown, field: string): number {
  return number(v, field, TEMP);
}

/** Check enzyme parameters (API units, kJ/mol) and return them typed. */
export function validateEnzyme(v: unknown, field = 'enzyme'): EnzymeParams {
  const o = object(v, field);
  const e: EnzymeParams = {
    tRefC: temperature(o.tRefC, `${field}.tRefC`),
    vmaxRef: number(o.vmaxRef, `${field}.vmaxRef`, { gt: 0 }),
    eaKJPerMol: number(o.eaKJPerMol, `${field}.eaKJPerMol`, { min: 0, max: 1000 }),
    kdRefPerH: number(o.kdRefPerH, `${field}.kdRefPerH`, { min: 0 }),
    edKJPerMol: number(o.edKJPerMol, `${field}.edKJPerMol`, { min: 0, max: 3000 }),
  };
  if (o.equilibrium !== undefined && o.equilibrium !== null) {
    const q = object(o.equilibrium, `${field}.equilibrium`);
    e.equilibrium = {
      teqC: temperature(q.teqC, `${field}.equilibrium.teqC`),
      dHeqKJPerMol: number(q.dHeqKJPerMol, `${field}.equilibrium.dHeqKJPerMol`, { gt: 0, max: 5000 }),
    };
  }
  return e;
}

/** Check substrate charge and Km (g/L). */
export function validateSubstrate(v: unknown, field = 'substrate'): Substrate {
  const o = object(v, field);
  return {
    s0GPerL: number(o.s0GPerL, `${field}.s0GPerL`, { gt: 0 }),
    kmGPerL: number(o.kmGPerL, `${field}.kmGPerL`, { gt: 0 }),
  };
}

/** Check a batch length in hours. */
export function validateBatchH(v: unknown, field = 'batchH'): number {
  return number(v, field, { gt: 0, max: 100000 });
}

/** Check a log of readings: h >= 0 and non-decreasing, c in range. */
export function validateLog(v: unknown, field = 'log'): Reading[] {
  const a = array(v, field);
  let prev = -Infinity;
  return a.map((item, i) => {
    const o = object(item, `${field}[${i}]`);
    const h = number(o.h, `${field}[${i}].h`, { min: 0 });
    if (h < prev) fail(`${field}[${i}].h`, 'must not be earlier than the reading before it');
    prev = h;
    return { h, c: temperature(o.c, `${field}[${i}].c`) };
  });
}

/** Check stages: hours > 0, c in range. */
export function validateStages(v: unknown, field = 'stages'): Stage[] {
  return array(v, field).map((item, i) => {
    const o = object(item, `${field}[${i}]`);
    return { hours: number(o.hours, `${field}[${i}].hours`, { gt: 0 }), c: temperature(o.c, `${field}[${i}].c`) };
  });
}

/** Check a temperature input: exactly one of setpointC, stages, log. */
export function validateTemperature(v: unknown, field = 'temperature'): TemperatureInput {
  const o = object(v, field);
  const keys = ['setpointC', 'stages', 'log'].filter((k) => o[k] !== undefined);
  if (keys.length !== 1) fail(field, 'must have exactly one of setpointC, stages, log');
  if (o.setpointC !== undefined) return { setpointC: temperature(o.setpointC, `${field}.setpointC`) };
  if (o.stages !== undefined) return { stages: validateStages(o.stages, `${field}.stages`) };
  return { log: validateLog(o.log, `${field}.log`) };
}

/** Check [lo, hi] temperature bounds in degC with lo <= hi. */
export function validateBounds(v: unknown, field = 'boundsC'): [number, number] {
  const a = array(v, field, 2);
  if (a.length !== 2) fail(field, 'must be [lo, hi]');
  const lo = temperature(a[0], `${field}[0]`);
  const hi = temperature(a[1], `${field}[1]`);
  if (lo > hi) fail(field, 'must have lo <= hi');
  return [lo, hi];
}

/** Input of the simulate command. */
export function validateSimulateInput(v: unknown) {
  const o = object(v, 'input');
  return {
    enzyme: validateEnzyme(o.enzyme),
    substrate: validateSubstrate(o.substrate),
    batchH: validateBatchH(o.batchH),
    temperature: validateTemperature(o.temperature),
  };
}

/** Input of the optimize command. */
export function validateOptimizeInput(v: unknown) {
  const o = object(v, 'input');
  return {
    enzyme: validateEnzyme(o.enzyme),
    substrate: validateSubstrate(o.substrate),
    batchH: validateBatchH(o.batchH),
    boundsC: validateBounds(o.boundsC),
  };
}

/** Input of the profile command. */
export function validateProfileInput(v: unknown) {
  const o = object(v, 'input');
  const base = validateOptimizeInput(v);
  const stages = number(o.stages, 'stages', { integer: true, min: 1, max: 1000 });
  const maxStepC = number(o.maxStepC, 'maxStepC', { min: 0 });
  const startC = o.startC === undefined ? undefined : temperature(o.startC, 'startC');
  if (startC !== undefined && (startC < base.boundsC[0] - maxStepC || startC > base.boundsC[1] + maxStepC))
    fail('startC', 'must be within maxStepC of boundsC');
  return { ...base, stages, maxStepC, startC };
}

/** Input of the fit command; the points' own rules are checked by fitInactivation. */
export function validateFitInput(v: unknown): { tRefC: number; points: InactivationPoint[] } {
  const o = object(v, 'input');
  const tRefC = temperature(o.tRefC, 'tRefC');
  const points = array(o.points, 'points').map((item, i) => {
    const p = object(item, `points[${i}]`);
    return {
      c: temperature(p.c, `points[${i}].c`),
      h: number(p.h, `points[${i}].h`, { min: 0 }),
      residual: number(p.residual, `points[${i}].residual`),
    };
  });
  return { tRefC, points };
}

/** Input of the dose command. */
export function validateDoseInput(v: unknown) {
  const o = object(v, 'input');
  return {
    enzyme: validateEnzyme(o.enzyme),
    substrate: validateSubstrate(o.substrate),
    batchH: validateBatchH(o.batchH),
    log: validateLog(o.log),
    plan: validateTemperature(o.plan, 'plan'),
    refC: o.refC === undefined ? undefined : temperature(o.refC, 'refC'),
  };
}

/** Check a covariance matrix: square 2x2 or 3x3, symmetric, finite, non-negative diagonal. */
export function validateCovariance(v: unknown, field = 'covariance'): number[][] {
  const rows = array(v, field, 2);
  const n = rows.length;
  if (n !== 2 && n !== 3) fail(field, 'must be 2x2 or 3x3');
  const m = rows.map((row, i) => {
    const r = array(row, `${field}[${i}]`, n);
    if (r.length !== n) fail(`${field}[${i}]`, `must have ${n} numbers`);
    return r.map((x, j) => number(x, `${field}[${i}][${j}]`));
  });
  for (let i = 0; i < n; i++) {
    if (m[i][i] < 0) fail(`${field}[${i}][${i}]`, 'must be >= 0');
    for (let j = 0; j < i; j++)
      if (Math.abs(m[i][j] - m[j][i]) > 1e-9 * Math.sqrt(m[i][i] * m[j][j]) + 1e-300) fail(field, 'must be symmetric');
  }
  return m;
}

/** Input of the uncertainty command. */
export function validateUncertaintyInput(v: unknown): UncertaintyInput {
  const o = object(v, 'input');
  const base = validateOptimizeInput(v);
  const input: UncertaintyInput = {
    ...base,
    covariance: validateCovariance(o.covariance),
    sensorBiasSdC: optionalNumber(o.sensorBiasSdC, 'sensorBiasSdC', { min: 0, max: 20 }),
    doseRelSd: optionalNumber(o.doseRelSd, 'doseRelSd', { min: 0, max: 2 }),
    draws: optionalNumber(o.draws, 'draws', { integer: true, min: 1, max: 1000000 }),
    seed: optionalNumber(o.seed, 'seed', { integer: true, min: 0, max: 4294967295 }),
  };
  if (base.enzyme.kdRefPerH <= 0) fail('enzyme.kdRefPerH', 'must be > 0 for the uncertainty command');
  if (o.candidatesC !== undefined)
    input.candidatesC = array(o.candidatesC, 'candidatesC').map((c, i) => {
      const t = temperature(c, `candidatesC[${i}]`);
      if (t < base.boundsC[0] || t > base.boundsC[1]) fail(`candidatesC[${i}]`, 'must lie within boundsC');
      return t;
    });
  if (o.robust !== undefined) {
    if (typeof o.robust !== 'boolean') fail('robust', 'must be true or false');
    input.robust = o.robust;
  }
  return input;
}

/** Check economics parameters (see EconomicsParams for units). */
export function validateEconomicsParams(v: unknown, field = 'economics'): EconomicsParams {
  const o = object(v, field);
  return {
    productPricePerKg: number(o.productPricePerKg, `${field}.productPricePerKg`, { min: 0 }),
    volumeL: number(o.volumeL, `${field}.volumeL`, { gt: 0 }),
    enzymeCostPerBatch: number(o.enzymeCostPerBatch, `${field}.enzymeCostPerBatch`, { min: 0 }),
    heatingCostPerDegCHour: number(o.heatingCostPerDegCHour, `${field}.heatingCostPerDegCHour`, { min: 0 }),
    ambientC: temperature(o.ambientC, `${field}.ambientC`),
    turnaroundH: number(o.turnaroundH, `${field}.turnaroundH`, { min: 0 }),
    otherCostPerBatch: optionalNumber(o.otherCostPerBatch, `${field}.otherCostPerBatch`, { min: 0 }),
  };
}

/** Input of the economics command: optimise batch length and setpoint; optionally price a given plan. */
export function validateEconomicsInput(v: unknown) {
  const o = object(v, 'input');
  const batchBounds = array(o.batchBoundsH, 'batchBoundsH', 2);
  if (batchBounds.length !== 2) fail('batchBoundsH', 'must be [shortest, longest]');
  const bLo = number(batchBounds[0], 'batchBoundsH[0]', { gt: 0, max: 100000 });
  const bHi = number(batchBounds[1], 'batchBoundsH[1]', { gt: 0, max: 100000 });
  if (bLo > bHi) fail('batchBoundsH', 'must have shortest <= longest');
  const out = {
    enzyme: validateEnzyme(o.enzyme),
    substrate: validateSubstrate(o.substrate),
    boundsC: validateBounds(o.boundsC),
    batchBoundsH: [bLo, bHi] as [number, number],
    economics: validateEconomicsParams(o.economics),
    curvePoints: o.curvePoints === undefined ? 25 : number(o.curvePoints, 'curvePoints', { integer: true, min: 2, max: 500 }),
    plan: undefined as { batchH: number; temperature: TemperatureInput } | undefined,
  };
  if (o.plan !== undefined) {
    const p = object(o.plan, 'plan');
    out.plan = { batchH: validateBatchH(p.batchH, 'plan.batchH'), temperature: validateTemperature(p.temperature, 'plan.temperature') };
  }
  return out;
}

// Building blocks for the validators of commands kept in files of their own (validate-calibrate.ts).
export { object as inputObject, array as inputArray, number as inputNumber };
