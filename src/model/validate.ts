import { ModelInputError } from './errors';
import type { EconomicsParams } from './economics';
import type { ConvertInput } from './convert';
import type { ErrorModel, InactivationPoint, InitialRatePoint } from './fit';
import { MAX_CANDIDATES, MAX_EVALUATIONS, SEARCH_EVALUATIONS, type UncertaintyInput } from './uncertainty';
import type { EnzymeParams, Reading, Stage, Substrate, TemperatureInput } from './types';

/** Temperatures the engine accepts, degC: wide enough for any enzyme process, narrow enough to catch unit slips (K, degF). */
export const TEMPERATURE_RANGE_C: [number, number] = [-50, 250];

type Obj = Record<string, unknown>;

function fail(field: string, rule: string): never {
  throw new ModelInputError(field, rule);
}

/** An object whose keys are all in `known` (a misspelt key is refused, never silently dropped). */
function object(v: unknown, field: string, known: readonly string[]): Obj {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) fail(field, 'must be an object');
  for (const k of Object.keys(v)) {
    if (!known.includes(k)) fail(field === 'input' ? k : `${field}.${k}`, `is not a known key (known: ${known.join(', ')})`);
  }
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
  if (rule.min !== undefined && rule.max !== undefined && (v < rule.min || v > rule.max)) fail(field, `must be between ${rule.min} and ${rule.max}`);
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

const ENZYME_KEYS = ['tRefC', 'vmaxRef', 'eaKJPerMol', 'kdRefPerH', 'edKJPerMol', 'equilibrium', 'stableFraction'];

/**
 * Magnitude limits: far beyond any enzyme process, and they keep every output a finite double
 * (a rate of 1e6 per hour, a charge of 10 kg/L, a vessel of 100,000 m3).
 */
const MAX_RATE = 1e6;
const MAX_G_PER_L = 1e4;
const CONSTANT_G_PER_L: NumRule = { min: 1e-9, max: 1e9 };

/** Check enzyme parameters (API units, kJ/mol) and return them typed. */
export function validateEnzyme(v: unknown, field = 'enzyme'): EnzymeParams {
  const o = object(v, field, ENZYME_KEYS);
  const e: EnzymeParams = {
    tRefC: temperature(o.tRefC, `${field}.tRefC`),
    vmaxRef: number(o.vmaxRef, `${field}.vmaxRef`, { gt: 0, max: MAX_RATE }),
    eaKJPerMol: number(o.eaKJPerMol, `${field}.eaKJPerMol`, { min: 0, max: 1000 }),
    kdRefPerH: number(o.kdRefPerH, `${field}.kdRefPerH`, { min: 0, max: MAX_RATE }),
    edKJPerMol: number(o.edKJPerMol, `${field}.edKJPerMol`, { min: 0, max: 3000 }),
  };
  if (o.equilibrium !== undefined && o.equilibrium !== null) {
    const q = object(o.equilibrium, `${field}.equilibrium`, ['teqC', 'dHeqKJPerMol']);
    e.equilibrium = {
      teqC: temperature(q.teqC, `${field}.equilibrium.teqC`),
      dHeqKJPerMol: number(q.dHeqKJPerMol, `${field}.equilibrium.dHeqKJPerMol`, { gt: 0, max: 5000 }),
    };
  }
  if (o.stableFraction !== undefined && o.stableFraction !== null) {
    const f = `${field}.stableFraction`;
    // No published model combines the two yet (science.md, Definitions).
    if (e.equilibrium) fail(f, 'cannot combine with equilibrium');
    const q = object(o.stableFraction, f, ['share', 'kdRefPerH', 'edKJPerMol']);
    const share = number(q.share, `${f}.share`, { gt: 0 });
    if (!(share < 1)) fail(`${f}.share`, 'must be < 1');
    e.stableFraction = {
      share,
      kdRefPerH: number(q.kdRefPerH, `${f}.kdRefPerH`, { min: 0, max: MAX_RATE }),
      edKJPerMol: number(q.edKJPerMol, `${f}.edKJPerMol`, { min: 0, max: 3000 }),
    };
  }
  return e;
}

/** Check substrate charge, Km and the optional inhibition constants (g/L). */
export function validateSubstrate(v: unknown, field = 'substrate'): Substrate {
  const o = object(v, field, ['s0GPerL', 'kmGPerL', 'kiGPerL', 'ksiGPerL']);
  const sub: Substrate = {
    s0GPerL: number(o.s0GPerL, `${field}.s0GPerL`, { gt: 0, max: MAX_G_PER_L }),
    kmGPerL: number(o.kmGPerL, `${field}.kmGPerL`, CONSTANT_G_PER_L),
  };
  const ki = optionalNumber(o.kiGPerL, `${field}.kiGPerL`, CONSTANT_G_PER_L);
  const ksi = optionalNumber(o.ksiGPerL, `${field}.ksiGPerL`, CONSTANT_G_PER_L);
  if (ki !== undefined) sub.kiGPerL = ki;
  if (ksi !== undefined) sub.ksiGPerL = ksi;
  return sub;
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
    const o = object(item, `${field}[${i}]`, ['h', 'c']);
    const h = number(o.h, `${field}[${i}].h`, { min: 0 });
    if (h < prev) fail(`${field}[${i}].h`, 'must not be earlier than the reading before it');
    prev = h;
    return { h, c: temperature(o.c, `${field}[${i}].c`) };
  });
}

/** Check stages: hours > 0, c in range. */
export function validateStages(v: unknown, field = 'stages'): Stage[] {
  return array(v, field).map((item, i) => {
    const o = object(item, `${field}[${i}]`, ['hours', 'c']);
    return { hours: number(o.hours, `${field}[${i}].hours`, { gt: 0 }), c: temperature(o.c, `${field}[${i}].c`) };
  });
}

/** Check a temperature input: exactly one of setpointC, stages, log. */
export function validateTemperature(v: unknown, field = 'temperature'): TemperatureInput {
  const o = object(v, field, ['setpointC', 'stages', 'log']);
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

const BATCH_KEYS = ['enzyme', 'substrate', 'batchH'];

/** Input of the simulate command. */
export function validateSimulateInput(v: unknown) {
  const o = object(v, 'input', [...BATCH_KEYS, 'temperature']);
  return {
    enzyme: validateEnzyme(o.enzyme),
    substrate: validateSubstrate(o.substrate),
    batchH: validateBatchH(o.batchH),
    temperature: validateTemperature(o.temperature),
  };
}

function optimizeBase(o: Obj) {
  return {
    enzyme: validateEnzyme(o.enzyme),
    substrate: validateSubstrate(o.substrate),
    batchH: validateBatchH(o.batchH),
    boundsC: validateBounds(o.boundsC),
  };
}

/** Input of the optimize command. */
export function validateOptimizeInput(v: unknown) {
  return optimizeBase(object(v, 'input', [...BATCH_KEYS, 'boundsC']));
}

/** Input of the profile command. */
export function validateProfileInput(v: unknown) {
  const o = object(v, 'input', [...BATCH_KEYS, 'boundsC', 'stages', 'maxStepC', 'startC']);
  const base = optimizeBase(o);
  const stages = number(o.stages, 'stages', { integer: true, min: 1, max: 1000 });
  const maxStepC = number(o.maxStepC, 'maxStepC', { min: 0 });
  const startC = o.startC === undefined ? undefined : temperature(o.startC, 'startC');
  if (startC !== undefined && (startC < base.boundsC[0] - maxStepC || startC > base.boundsC[1] + maxStepC))
    fail('startC', 'must be within maxStepC of boundsC');
  return { ...base, stages, maxStepC, startC };
}

/** Input of the fit command: residuals as fractions of the activity at h = 0; the points' own rules are checked by fitInactivation. */
export function validateFitInput(v: unknown): { tRefC: number; points: InactivationPoint[]; errorModel: ErrorModel } {
  const o = object(v, 'input', ['tRefC', 'points', 'errorModel']);
  const tRefC = temperature(o.tRefC, 'tRefC');
  const points = array(o.points, 'points').map((item, i) => {
    const p = object(item, `points[${i}]`, ['c', 'h', 'residual']);
    return {
      c: temperature(p.c, `points[${i}].c`),
      h: number(p.h, `points[${i}].h`, { min: 0 }),
      residual: number(p.residual, `points[${i}].residual`),
    };
  });
  const errorModel = o.errorModel === undefined ? 'relative' : o.errorModel;
  if (errorModel !== 'relative' && errorModel !== 'absolute') fail('errorModel', 'must be "relative" or "absolute"');
  return { tRefC, points, errorModel };
}

/** Input of the dose command. */
export function validateDoseInput(v: unknown) {
  const o = object(v, 'input', [...BATCH_KEYS, 'log', 'plan', 'refC']);
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
    for (let j = 0; j < i; j++) if (Math.abs(m[i][j] - m[j][i]) > 1e-9 * Math.sqrt(m[i][i] * m[j][j]) + 1e-300) fail(field, 'must be symmetric');
  }
  return m;
}

/** Input of the uncertainty command. */
export function validateUncertaintyInput(v: unknown): UncertaintyInput {
  const o = object(v, 'input', [...BATCH_KEYS, 'boundsC', 'covariance', 'sensorBiasSdC', 'doseRelSd', 'draws', 'seed', 'candidatesC', 'robust']);
  const base = optimizeBase(o);
  const input: UncertaintyInput = {
    ...base,
    covariance: validateCovariance(o.covariance),
    sensorBiasSdC: optionalNumber(o.sensorBiasSdC, 'sensorBiasSdC', { min: 0, max: 20 }),
    doseRelSd: optionalNumber(o.doseRelSd, 'doseRelSd', { min: 0, max: 2 }),
    draws: optionalNumber(o.draws, 'draws', { integer: true, min: 1, max: 1000000 }),
    seed: optionalNumber(o.seed, 'seed', { integer: true, min: 0, max: 4294967295 }),
  };
  if (base.enzyme.kdRefPerH <= 0) fail('enzyme.kdRefPerH', 'must be > 0 for the uncertainty command');
  if (o.candidatesC !== undefined) {
    const list = array(o.candidatesC, 'candidatesC');
    if (list.length > MAX_CANDIDATES) fail('candidatesC', `must have at most ${MAX_CANDIDATES} setpoints`);
    input.candidatesC = list.map((c, i) => {
      const t = temperature(c, `candidatesC[${i}]`);
      if (t < base.boundsC[0] || t > base.boundsC[1]) fail(`candidatesC[${i}]`, 'must lie within boundsC');
      return t;
    });
  }
  const cands = input.candidatesC?.length ?? 11;
  if ((input.draws ?? 10000) * (cands + 2 + SEARCH_EVALUATIONS) > MAX_EVALUATIONS)
    fail('draws', `draws x (candidates + ${2 + SEARCH_EVALUATIONS}) must be <= ${MAX_EVALUATIONS}`);
  if (o.robust !== undefined) {
    if (typeof o.robust !== 'boolean') fail('robust', 'must be true or false');
    input.robust = o.robust;
  }
  return input;
}

const ECONOMICS_KEYS = ['productPricePerKg', 'volumeL', 'enzymeCostPerBatch', 'heatingCostPerDegCHour', 'ambientC', 'turnaroundH', 'otherCostPerBatch'];

/** Check economics parameters (see EconomicsParams for units). */
export function validateEconomicsParams(v: unknown, field = 'economics'): EconomicsParams {
  const o = object(v, field, ECONOMICS_KEYS);
  // Money limits keep every figure a finite double (1e6 a kg, 1e12 a batch); volume up to 100,000 m3.
  const out: EconomicsParams = {
    productPricePerKg: number(o.productPricePerKg, `${field}.productPricePerKg`, { min: 0, max: 1e6 }),
    volumeL: number(o.volumeL, `${field}.volumeL`, { gt: 0, max: 1e8 }),
    enzymeCostPerBatch: number(o.enzymeCostPerBatch, `${field}.enzymeCostPerBatch`, { min: 0, max: 1e12 }),
    heatingCostPerDegCHour: number(o.heatingCostPerDegCHour, `${field}.heatingCostPerDegCHour`, { min: 0, max: 1e9 }),
    ambientC: temperature(o.ambientC, `${field}.ambientC`),
    turnaroundH: number(o.turnaroundH, `${field}.turnaroundH`, { min: 0, max: 100000 }),
  };
  const other = optionalNumber(o.otherCostPerBatch, `${field}.otherCostPerBatch`, { min: 0, max: 1e12 });
  if (other !== undefined) out.otherCostPerBatch = other;
  return out;
}

/** Input of the economics command: optimise batch length and setpoint; optionally price a given plan. */
export function validateEconomicsInput(v: unknown) {
  const o = object(v, 'input', ['enzyme', 'substrate', 'boundsC', 'batchBoundsH', 'economics', 'curvePoints', 'plan']);
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
    const p = object(o.plan, 'plan', ['batchH', 'temperature']);
    out.plan = { batchH: validateBatchH(p.batchH, 'plan.batchH'), temperature: validateTemperature(p.temperature, 'plan.temperature') };
  }
  return out;
}

const CONVERT_FIELDS: Record<ConvertInput['kind'], string[]> = {
  kd: ['kdPerH'],
  halfLife: ['halfLifeH'],
  dValue: ['dValueH'],
  residual: ['residual', 'minutes'],
  z: ['zC', 't1C', 't2C'],
  ed: ['edKJPerMol', 't1C', 't2C'],
  q10: ['q10', 't1C'],
  ea: ['eaKJPerMol', 't1C'],
  equivalentTimes: ['t1C', 'time1', 't2C', 'time2'],
};

/** Input of the convert command: one statement `{ kind, ...its figures }` (see ConvertInput). */
export function validateConvertInput(v: unknown): ConvertInput {
  const kinds = Object.keys(CONVERT_FIELDS) as ConvertInput['kind'][];
  if (typeof v !== 'object' || v === null || Array.isArray(v)) fail('input', 'must be an object');
  const kind = (v as Obj).kind;
  if (typeof kind !== 'string' || !(kinds as string[]).includes(kind)) fail('kind', `must be one of ${kinds.join(', ')}`);
  const k = kind as ConvertInput['kind'];
  const o = object(v, 'input', ['kind', ...CONVERT_FIELDS[k]]);
  const out: Record<string, unknown> = { kind: k };
  for (const f of CONVERT_FIELDS[k]) {
    if (f.endsWith('C')) out[f] = f === 'zC' ? number(o[f], f, { gt: 0, max: 1000 }) : temperature(o[f], f);
    else if (f === 'residual') {
      const r = number(o[f], f, { gt: 0 });
      if (!(r < 1)) fail(f, 'must be a fraction below 1 (give fractions, not per cent)');
      out[f] = r;
    } else if (f === 'q10') out[f] = number(o[f], f, { gt: 1, max: 100 });
    else if (f === 'eaKJPerMol' || f === 'edKJPerMol') out[f] = number(o[f], f, { gt: 0, max: 3000 });
    else out[f] = number(o[f], f, { gt: 0, max: 1e12 });
  }
  if ((k === 'z' || k === 'ed' || k === 'equivalentTimes') && out.t1C === out.t2C) fail('t2C', 'must differ from t1C');
  if (k === 'equivalentTimes') {
    const hotterShorter = (out.t2C as number) > (out.t1C as number) === (out.time2 as number) < (out.time1 as number);
    if (out.time1 === out.time2 || !hotterShorter) fail('time2', 'must be shorter at the hotter temperature');
  }
  return out as ConvertInput;
}

/** Input of the fit-rates command: initial rates (any positive unit) at several temperatures. */
export function validateFitRatesInput(v: unknown): { tRefC: number; points: InitialRatePoint[] } {
  const o = object(v, 'input', ['tRefC', 'points']);
  const tRefC = temperature(o.tRefC, 'tRefC');
  const points = array(o.points, 'points').map((item, i) => {
    const p = object(item, `points[${i}]`, ['c', 'rate']);
    return { c: temperature(p.c, `points[${i}].c`), rate: number(p.rate, `points[${i}].rate`, { gt: 0 }) };
  });
  return { tRefC, points };
}

// Building blocks for the validators of commands kept in files of their own (validate-calibrate.ts).
export { object as inputObject, array as inputArray, number as inputNumber };
