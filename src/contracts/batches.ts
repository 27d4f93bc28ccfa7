import { z } from 'zod';
import { BATCH_STATUSES, DEVIATION_KINDS, DEVIATION_STATES, PLAN_SOURCES, READING_SOURCES } from '../enums';
import { KineticsEvidence } from './plans';
import { CLOCK_SKEW_MIN, READING_MAX_C, READING_MIN_C } from './rules';

export { CLOCK_SKEW_MIN, READING_MAX_C, READING_MIN_C };

export { BATCH_STATUSES, DEVIATION_KINDS, DEVIATION_STATES, PLAN_SOURCES, READING_SOURCES };
export type ReadingSource = (typeof READING_SOURCES)[number];
export type DeviationKind = (typeof DEVIATION_KINDS)[number];

const isoInstant = z.iso.datetime({ offset: true, message: 'Give a date and time with its zone, e.g. 2026-12-01T08:00:00Z' });

/** What a deviation is measured against: the site's settings. */
export const BatchSettings = z.object({
  /** Half-width of the band around the planned temperature, degC. */
  toleranceC: z.number().min(0.1, 'At least 0.1 °C').max(20, 'At most 20 °C'),
  /** Longest allowed time between readings, minutes. */
  gapLimitMin: z
    .number()
    .int()
    .min(1, 'At least 1 minute')
    .max(24 * 60, 'At most 24 h'),
});
export type BatchSettings = z.infer<typeof BatchSettings>;
export const DEFAULT_BATCH_SETTINGS: BatchSettings = { toleranceC: 1.5, gapLimitMin: 30 };

export const BatchSettingsPatch = BatchSettings.partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'Nothing to change');
export type BatchSettingsPatch = z.infer<typeof BatchSettingsPatch>;

const Point = z.object({ h: z.number(), c: z.number() });

/** Everything the engine needs for this batch, frozen when it starts so later recipe or plan edits do not move it. */
export const BatchProgram = z.object({
  source: z.enum(PLAN_SOURCES),
  planId: z.number().int().nullable(),
  batchH: z.number(),
  /** Stages as planned (one stage for a setpoint), degC. */
  stages: z.array(z.object({ hours: z.number(), c: z.number() })),
  /** The stages as the vessel runs them, ramps from the fill temperature included: the planned temperature vs time. */
  log: z.array(Point),
  fillC: z.number(),
  enzyme: z.object({ tRefC: z.number(), vmaxRef: z.number(), eaKJPerMol: z.number(), kdRefPerH: z.number(), edKJPerMol: z.number() }),
  substrate: z.object({ s0GPerL: z.number(), kmGPerL: z.number() }),
  plannedProductGPerL: z.number(),
  /** The plan's P10 product when its Monte Carlo was run; null otherwise. */
  p10GPerL: z.number().nullable(),
  vessel: z.object({ minC: z.number(), maxC: z.number(), hygienicMinC: z.number() }),
  /** Where the frozen kinetics came from; absent on batches started before evidence was recorded. */
  evidence: KineticsEvidence.optional(),
});
export type BatchProgram = z.infer<typeof BatchProgram>;

export const BatchStart = z.strictObject({
  recipeId: z.number().int().positive(),
  vesselId: z.number().int().positive(),
  lotId: z.number().int().positive(),
  startedAt: isoInstant,
});
export type BatchStart = z.infer<typeof BatchStart>;

export const BatchClose = z.strictObject({
  /** Product measured at the end (lab result), g/L; optional. */
  measuredProductGPerL: z.number().min(0, 'Must be 0 or more').max(5000).nullable().optional(),
  comment: z.string().trim().max(500).optional(),
});
export type BatchClose = z.infer<typeof BatchClose>;

export const ReadingInput = z.strictObject({
  /** Made on the device once per reading, so a resend after a lost answer is stored once. */
  key: z.string().regex(/^[A-Za-z0-9_.:-]{8,80}$/, 'A key of 8-80 letters, digits or _.:-'),
  takenAt: isoInstant,
  c: z
    .number({ message: 'Enter a temperature in °C' })
    .refine(Number.isFinite, 'Enter a temperature in °C')
    .min(READING_MIN_C, `A reactor reading lies between ${READING_MIN_C} and ${READING_MAX_C} °C`)
    .max(READING_MAX_C, `A reactor reading lies between ${READING_MIN_C} and ${READING_MAX_C} °C`),
  note: z.string().trim().max(300).optional(),
});
export type ReadingInput = z.infer<typeof ReadingInput>;

export const Reading = z.object({
  id: z.number().int(),
  key: z.string(),
  takenAt: z.string(),
  /** Batch time of the reading, h. */
  h: z.number(),
  c: z.number(),
  note: z.string().nullable(),
  source: z.enum(READING_SOURCES),
  enteredBy: z.string(),
});
export type Reading = z.infer<typeof Reading>;

export const Corrective = z.object({
  /** Best setpoint for the rest of the batch from the state at the last reading, within the vessel's limits, degC. */
  setpointC: z.number(),
  fromH: z.number(),
  remainingH: z.number(),
  forecastGPerL: z.number(),
  /** Forecast if the plan is followed from the same point, for comparison. */
  planForecastGPerL: z.number(),
  boundsC: z.tuple([z.number(), z.number()]),
});
export type Corrective = z.infer<typeof Corrective>;

export const Deviation = z.object({
  id: z.number().int(),
  batchId: z.number().int(),
  kind: z.enum(DEVIATION_KINDS),
  state: z.enum(DEVIATION_STATES),
  readingId: z.number().int().nullable(),
  /** When it happened (the reading's time), ISO. */
  at: z.string(),
  message: z.string(),
  valueC: z.number().nullable(),
  expectedC: z.number().nullable(),
  corrective: Corrective.nullable(),
  raisedAt: z.string(),
  acknowledgedBy: z.string().nullable(),
  acknowledgedAt: z.string().nullable(),
  acknowledgeComment: z.string().nullable(),
  closedBy: z.string().nullable(),
  closedAt: z.string().nullable(),
  closeComment: z.string().nullable(),
});
export type Deviation = z.infer<typeof Deviation>;

export const DeviationAcknowledge = z.strictObject({ comment: z.string().trim().min(3, 'Say what happened or what you did (at least 3 characters)').max(500) });
export type DeviationAcknowledge = z.infer<typeof DeviationAcknowledge>;
export const DeviationClose = z.strictObject({ comment: z.string().trim().max(500).optional() });
export type DeviationClose = z.infer<typeof DeviationClose>;

/** The engine's view of the batch now, from the stored readings. */
export const BatchStatus = z.object({
  readings: z.number().int(),
  lastH: z.number(),
  hoursLeft: z.number(),
  plannedNowC: z.number(),
  equivalentHAtRef: z.number(),
  refC: z.number(),
  activityLeft: z.number(),
  productSoFarGPerL: z.number(),
  forecastGPerL: z.number(),
  forecastActivityLeft: z.number(),
  plannedProductGPerL: z.number(),
  p10GPerL: z.number().nullable(),
  corrective: Corrective.nullable(),
});
export type BatchStatus = z.infer<typeof BatchStatus>;

export const Batch = z.object({
  id: z.number().int(),
  recipeId: z.number().int(),
  recipeName: z.string(),
  vesselId: z.number().int(),
  vesselName: z.string(),
  lotId: z.number().int(),
  lotCode: z.string(),
  state: z.enum(BATCH_STATUSES),
  startedAt: z.string(),
  startedBy: z.string(),
  closedAt: z.string().nullable(),
  closedBy: z.string().nullable(),
  closeComment: z.string().nullable(),
  measuredProductGPerL: z.number().nullable(),
  forecastAtCloseGPerL: z.number().nullable(),
  program: BatchProgram,
  /** Started by the caller or logged by the caller: listed first as "my batches". */
  isMine: z.boolean(),
});
export type Batch = z.infer<typeof Batch>;

/** A change-control signature on the plan the batch runs. */
export const PlanSignature = z.object({
  changeRequestId: z.number().int(),
  printedName: z.string(),
  role: z.string(),
  meaning: z.string(),
  comment: z.string(),
  signedAt: z.string(),
  recordHash: z.string(),
});
export type PlanSignature = z.infer<typeof PlanSignature>;

export const BatchDetail = z.object({
  batch: Batch,
  /** All readings, or for a long historian record an even sample plus the latest ones (see readingsTotal). */
  readings: z.array(Reading),
  readingsTotal: z.number().int(),
  deviations: z.array(Deviation),
  status: BatchStatus,
  settings: BatchSettings,
  /** Signatures that released the batch's plan; empty for a batch on the recipe's current setpoint. */
  signatures: z.array(PlanSignature),
  /** The server's clock, so the phone can show how long ago the last reading was. */
  now: z.string(),
});
export type BatchDetail = z.infer<typeof BatchDetail>;

/** The readings table, a page at a time, newest first. */
export const ReadingsPageQuery = z.strictObject({
  before: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(500).default(50),
});
export const ReadingsPage = z.object({
  readings: z.array(Reading),
  /** Pass as `before` for the next (older) page; null on the last page. */
  nextBefore: z.number().int().nullable(),
});
export type ReadingsPage = z.infer<typeof ReadingsPage>;

export const BatchSummary = z.object({
  id: z.number().int(),
  recipeName: z.string(),
  vesselName: z.string(),
  lotCode: z.string(),
  source: z.enum(PLAN_SOURCES),
  state: z.enum(BATCH_STATUSES),
  startedAt: z.string(),
  closedAt: z.string().nullable(),
  batchH: z.number(),
  isMine: z.boolean(),
  openDeviations: z.number().int(),
  lastReadingAt: z.string().nullable(),
  plannedProductGPerL: z.number(),
  /** Running: the forecast now; closed: the forecast recorded at closing. */
  forecastGPerL: z.number(),
  measuredProductGPerL: z.number().nullable(),
});
export type BatchSummary = z.infer<typeof BatchSummary>;

export const BatchList = z.object({ batches: z.array(BatchSummary) });
export type BatchList = z.infer<typeof BatchList>;

export const ReadingResult = z.object({ reading: Reading, deviations: z.array(Deviation) });
export type ReadingResult = z.infer<typeof ReadingResult>;

export const ImportProblem = z.object({
  line: z.number().int(),
  kind: z.enum(['invalid', 'duplicate', 'already_stored', 'out_of_order']),
  message: z.string(),
});
export type ImportProblem = z.infer<typeof ImportProblem>;

/** Largest historian import: readings (data rows) and bytes of CSV, both checked while the upload streams in. */
export const MAX_IMPORT_ROWS = 300_000;
export const MAX_IMPORT_BYTES = 12 * 1024 * 1024;

export const ImportQuery = z.object({
  /** Zone of times written without one; the site's zone when omitted. */
  timeZone: z.string().max(64).optional(),
  dateOrder: z.enum(['dmy', 'mdy']).default('dmy'),
});
export type ImportQuery = z.infer<typeof ImportQuery>;

export const ImportResult = z.object({
  rows: z.number().int(),
  imported: z.number().int(),
  skipped: z.number().int(),
  outOfOrder: z.number().int(),
  deviationsRaised: z.number().int(),
  /** First problems by line (at most 200); counts above cover all. */
  problems: z.array(ImportProblem),
  timeZone: z.string(),
  /** How the file's bytes were read (UTF-8, UTF-16 from its BOM or bytes, or Windows-1252 / Latin-1). */
  encoding: z.string(),
});
export type ImportResult = z.infer<typeof ImportResult>;

/** A running historian import into a batch: bytes read of the upload, then storing. */
export const ImportProgress = z.object({
  isRunning: z.boolean(),
  bytesRead: z.number().int(),
  bytesTotal: z.number().int(),
  phase: z.enum(['reading', 'storing']).nullable(),
  /** While storing: readings stored so far of those the file adds. */
  rowsStored: z.number().int(),
  rowsToStore: z.number().int(),
});
export type ImportProgress = z.infer<typeof ImportProgress>;
