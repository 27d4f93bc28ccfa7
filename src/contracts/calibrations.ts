import { z } from 'zod';
import { CALIBRATION_STATES } from '../enums';

const Matrix = z.array(z.array(z.number()));

/** Posterior of the lot's stability and the recipe's catalytic scale from closed batches. */
export const CalibrationPosterior = z.object({
  kdRefPerH: z.number(),
  edKJPerMol: z.number(),
  vmaxScale: z.number(),
  /** Covariance of [ln kdRefPerH, edKJPerMol (kJ/mol), ln vmaxScale]. */
  covariance: Matrix,
});
export type CalibrationPosterior = z.infer<typeof CalibrationPosterior>;

/** A calibration the engineer accepted for a recipe and lot: what plans, batches and deviations then use. */
export const AcceptedCalibration = CalibrationPosterior.extend({
  id: z.number().int(),
  acceptedAt: z.string(),
  acceptedBy: z.string(),
  batchCount: z.number().int(),
  /** The assay fit it started from (its prior); null when it started from the certificate. */
  fitAssayId: z.number().int().nullable(),
});
export type AcceptedCalibration = z.infer<typeof AcceptedCalibration>;

export { CALIBRATION_STATES };

/** One closed batch as calibration read it: measured against the forecasts before and after (g/L). */
export const CalibrationBatchResult = z.object({
  batchId: z.number().int(),
  closedAt: z.string(),
  measuredProductGPerL: z.number(),
  measurementSdGPerL: z.number(),
  /** The model on the assay evidence alone (the prior), with the logged temperatures, and its sd. */
  priorForecastGPerL: z.number(),
  priorSdGPerL: z.number(),
  posteriorForecastGPerL: z.number(),
  /** From all the other batches: the honest forecast of this one after calibration. */
  leaveOneOutForecastGPerL: z.number(),
  leaveOneOutSdGPerL: z.number(),
  standardisedResidual: z.number(),
  /** |standardised residual| above 3: shown, and left out only by the engineer's explicit choice. */
  isOutlier: z.boolean(),
});
export type CalibrationBatchResult = z.infer<typeof CalibrationBatchResult>;

/** The posterior after the first batchCount batches (in closing order), with 95 % bands; batchCount 0 is the prior. */
export const DriftPoint = z.object({
  batchCount: z.number().int(),
  halfLifeRefH: z.number(),
  halfLifeLowH: z.number(),
  halfLifeHighH: z.number(),
  edKJPerMol: z.number(),
  edLow: z.number(),
  edHigh: z.number(),
  vmaxScale: z.number(),
  vmaxScaleLow: z.number(),
  vmaxScaleHigh: z.number(),
});
export type DriftPoint = z.infer<typeof DriftPoint>;

export const ForecastError = z.object({ biasGPerL: z.number(), rmseGPerL: z.number() });
export type ForecastError = z.infer<typeof ForecastError>;

/** A closed batch left out of a calibration, and why (the engineer's reason, or why it cannot be used). */
export const CalibrationLeftOut = z.object({ batchId: z.number().int(), reason: z.string(), by: z.string().nullable(), at: z.string().nullable() });
export type CalibrationLeftOut = z.infer<typeof CalibrationLeftOut>;

/** What a calibration computed, stored with it. */
export const CalibrationResult = z.object({
  prior: CalibrationPosterior.extend({ text: z.string(), fitAssayId: z.number().int().nullable() }),
  posterior: CalibrationPosterior,
  /** Relative sd of a measured product (0.02 = 2 %). */
  measurementRelSd: z.number(),
  batches: z.array(CalibrationBatchResult),
  /** Forecast minus measured over the batches used: on the prior, and leave-one-out after calibration. */
  before: ForecastError,
  after: ForecastError,
  drift: z.array(DriftPoint),
  leftOut: z.array(CalibrationLeftOut),
});
export type CalibrationResult = z.infer<typeof CalibrationResult>;

export const Calibration = z.object({
  id: z.number().int(),
  recipeId: z.number().int(),
  lotId: z.number().int(),
  state: z.enum(CALIBRATION_STATES),
  createdAt: z.string(),
  decidedBy: z.string().nullable(),
  decidedAt: z.string().nullable(),
  batchIds: z.array(z.number().int()),
  result: CalibrationResult,
});
export type Calibration = z.infer<typeof Calibration>;

/** A recipe and lot's model quality: the proposal waiting for the engineer, the one in use, and the assay-only basis. */
export const CalibrationView = z.object({
  recipeId: z.number().int(),
  lotId: z.number().int(),
  proposed: Calibration.nullable(),
  accepted: Calibration.nullable(),
  /** The evidence plans use now, in words. */
  inUse: z.string(),
});
export type CalibrationView = z.infer<typeof CalibrationView>;

/** The site's spread of a measured product for calibration, relative (0.02 = 2 % of the product, 1 sd). */
export const CalibrationSettings = z.object({
  measurementRelSd: z.number({ error: 'Enter a number' }).min(0.001, 'At least 0.1 %').max(0.2, 'At most 20 %'),
});
export type CalibrationSettings = z.infer<typeof CalibrationSettings>;
export const CalibrationSettingsPatch = CalibrationSettings.strict();
export type CalibrationSettingsPatch = z.infer<typeof CalibrationSettingsPatch>;

export const CalibrationQuery = z.object({ recipeId: z.coerce.number().int().positive(), lotId: z.coerce.number().int().positive() });
export type CalibrationQuery = z.infer<typeof CalibrationQuery>;

export const CalibrationAccept = z.strictObject({ comment: z.string().trim().max(500).optional() });
export type CalibrationAccept = z.infer<typeof CalibrationAccept>;

/** The engineer leaves a batch out of calibration (or takes it back in), always with a reason. */
export const CalibrationExclusion = z.strictObject({
  batchId: z.number().int().positive(),
  isExcluded: z.boolean(),
  reason: z.string().trim().min(3, 'Say why').max(500),
});
export type CalibrationExclusion = z.infer<typeof CalibrationExclusion>;
