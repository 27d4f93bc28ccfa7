import { z } from 'zod';
import { ASSAY_SOURCES, RESIDUAL_SCALES } from '../enums';

/** Largest assay a lot can carry, in data rows and in bytes of CSV. */
export const MAX_ASSAY_ROWS = 100_000;
export const MAX_ASSAY_BYTES = 20 * 1024 * 1024;
/** Points sent with a lot's detail for its charts and tables; larger assays are summarised by their fit. */
export const MAX_POINTS_SHOWN = 2_000;

export const ResidualScale = z.enum(RESIDUAL_SCALES);
export type ResidualScale = z.infer<typeof ResidualScale>;

// A typed cell as the user typed it, or a number: the server checks both the way it checks a CSV cell.
const Cell = z.union([z.number(), z.string().max(40)], { error: 'A number or the text typed' });

/** One typed row of the editable table (residual as typed: fraction or percent). */
export const AssayRowInput = z.strictObject({
  tempC: Cell,
  timeH: Cell,
  residual: Cell,
  note: z.string().max(200).optional(),
});
export type AssayRowInput = z.infer<typeof AssayRowInput>;

export const AssayTableInput = z.strictObject({
  rows: z.array(AssayRowInput).min(1, 'Add at least one row').max(MAX_ASSAY_ROWS),
  scale: ResidualScale.optional(),
});
export type AssayTableInput = z.infer<typeof AssayTableInput>;

/** Form fields sent with an assay CSV: the residual unit, when the column header does not name it. */
export const AssayUpload = z.object({ scale: ResidualScale.optional() });
export type AssayUpload = z.infer<typeof AssayUpload>;

/** A stored measurement; residual is always a fraction of the activity at time 0. */
export const AssayPoint = z.object({
  line: z.number().int(),
  tempC: z.number(),
  timeH: z.number(),
  residual: z.number(),
  note: z.string().nullable(),
});
export type AssayPoint = z.infer<typeof AssayPoint>;

export const HalfLifeEstimate = z.object({
  c: z.number(),
  kdPerH: z.number(),
  halfLifeH: z.number(),
  lowerH: z.number(),
  upperH: z.number(),
});
export type HalfLifeEstimate = z.infer<typeof HalfLifeEstimate>;

export const FitModelName = z.enum(['first-order', 'first-order-a0', 'two-fraction']);
export type FitModelName = z.infer<typeof FitModelName>;

/** One of the models the fit compared on the same points (the engine's `models`, without its covariance). */
export const FitModelSummary = z.object({
  name: FitModelName,
  kdRefPerH: z.number(),
  edKJPerMol: z.number(),
  /** Time to half the activity at h = 0 at tRefC (two fractions: of the mixture), h. */
  halfLifeRefH: z.number(),
  aicc: z.number().nullable(),
  a0: z.number().optional(),
  stableFraction: z.object({ share: z.number(), kdRefPerH: z.number(), edKJPerMol: z.number() }).optional(),
  /** Why the model cannot be chosen (singular, not identified), when so. */
  singular: z.string().optional(),
});
export type FitModelSummary = z.infer<typeof FitModelSummary>;

/**
 * The engine's fit as stored with the assay: the chosen model's figures (covariance of [ln kdRef, Ed in kJ/mol]),
 * the models compared and the lack-of-fit sentence. Fits stored before the comparison lack the last three.
 */
export const AssayFit = z.object({
  tRefC: z.number(),
  kdRefPerH: z.number(),
  edKJPerMol: z.number(),
  halfLifeRefH: z.number(),
  se: z.object({ kdRefPerH: z.number(), edKJPerMol: z.number(), halfLifeRefH: z.number() }),
  covariance: z.array(z.array(z.number())),
  residualSd: z.number(),
  n: z.number().int(),
  dof: z.number().int(),
  twoStep: z.object({
    perTemperature: z.array(z.object({ c: z.number(), kdPerH: z.number(), se: z.number().nullable(), n: z.number().int() })),
    kdRefPerH: z.number().nullable(),
    edKJPerMol: z.number().nullable(),
  }),
  chosen: FitModelName.optional(),
  models: z.array(FitModelSummary).optional(),
  /** Null, or one sentence on how the chosen model misses the data. */
  lackOfFit: z.string().nullable().optional(),
});
export type AssayFit = z.infer<typeof AssayFit>;

export const Assay = z.object({
  id: z.number().int(),
  lotId: z.number().int(),
  source: z.enum(ASSAY_SOURCES),
  fileName: z.string().nullable(),
  scale: ResidualScale,
  /** Why the residual column was read as it was, in words for the user. */
  scaleNote: z.string(),
  createdAt: z.string(),
  createdBy: z.string(),
  fit: AssayFit.nullable(),
  /** Why there is no fit, when there is none. */
  fitProblem: z.string().nullable(),
  /** Half-life at the enzyme's specification temperature with its 95 % interval. */
  atSpec: HalfLifeEstimate.nullable(),
  pointCount: z.number().int(),
  /** The first MAX_POINTS_SHOWN points; the CSV export has all of them. */
  points: z.array(AssayPoint),
});
export type Assay = z.infer<typeof Assay>;
