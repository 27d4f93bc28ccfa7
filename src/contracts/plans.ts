import { z } from 'zod';
import { PLAN_STRATEGIES } from '../enums';
import { heatingCost, pricePerKg } from './recipes';

const positive = z.number().positive('Must be more than 0');
const nonNegative = z.number().min(0, 'Must be 0 or more');

export { PLAN_STRATEGIES };

/** Spread the user sets for the Monte Carlo; the parameter spread comes from the lot. */
export const UncertaintySettings = z.strictObject({
  draws: z.number().int().min(200).max(20000),
  seed: z.number().int().min(0).max(4294967295),
  /** Standard deviation of the reactor's temperature-sensor bias, degC. */
  sensorBiasSdC: z.number().min(0).max(5),
  /** Relative standard deviation of the enzyme dose (0.05 = 5 %). */
  doseRelSd: z.number().min(0).max(0.5),
});
export type UncertaintySettings = z.infer<typeof UncertaintySettings>;

/**
 * What the engineer chose. Everything else (enzyme kinetics, lot stability, vessel limits) the server reads
 * from its own records, and every output it computes itself.
 */
export const PlanInputs = z.strictObject({
  recipeId: z.number().int().positive(),
  lotId: z.number().int().positive(),
  batchH: positive.max(500, 'At most 500 h'),
  turnaroundH: nonNegative.max(500),
  doseGPerL: positive.max(1000),
  s0GPerL: positive.max(2000),
  kmGPerL: positive.max(2000),
  productPricePerKg: pricePerKg,
  enzymePricePerKg: pricePerKg,
  heatingCostPerDegCHour: heatingCost,
  currentSetpointC: z.number().min(-20).max(250),
  strategy: z.enum(PLAN_STRATEGIES),
  /** Staged profile: number of equal stages and the largest step between neighbours, degC. */
  stages: z.number().int().min(2).max(8),
  maxStepC: positive.max(30),
  uncertainty: UncertaintySettings.nullable(),
});
export type PlanInputs = z.infer<typeof PlanInputs>;

export const STABILITY_SOURCES = ['certificate', 'fit', 'calibration'] as const;

/** Where a computation's kinetics came from, in words and by record, so a stored result can say when it is older. */
export const KineticsEvidence = z.object({
  source: z.enum(STABILITY_SOURCES),
  /** "assay fit of 2026-11-28, 16 points, t½ 25.4 h (95 % 24.6–26.3 h) at 60 °C" or "certificate only, default spread". */
  text: z.string(),
  fitAssayId: z.number().int().nullable(),
  calibrationId: z.number().int().nullable(),
  /** Multiplies the recipe's Vmax: 1 until a calibration is accepted. */
  vmaxScale: z.number(),
  /** The certificate's half-life outside the fit's 95 % interval, in words; null when they agree or there is no fit. */
  disagreement: z.string().nullable(),
});
export type KineticsEvidence = z.infer<typeof KineticsEvidence>;

export const PlanStage = z.object({ hours: z.number(), c: z.number() });
export type PlanStage = z.infer<typeof PlanStage>;

export const PlanCautions = z.object({
  /** The plan reaches above 100 degC: a pressurised operation for a water-based batch. */
  crossesBoiling: z.boolean(),
  maxC: z.number(),
  saturationKPa: z.number(),
  /** The plan holds the batch below the vessel's hygienic minimum. */
  belowHygienicMin: z.boolean(),
  hygienicMinC: z.number(),
});
export type PlanCautions = z.infer<typeof PlanCautions>;

/** What a plan predicts; computed by src/planning on both sides, stored from the server's run only. */
export const PlanOutputs = z.object({
  strategy: z.enum(PLAN_STRATEGIES),
  /** The recommended isothermal setpoint (also the reference for a staged plan), degC. */
  setpointC: z.number(),
  /** Stages of the recommended profile; null for an isothermal plan. */
  stages: z.array(PlanStage).nullable(),
  /** Product at the end of the batch with the vessel's ramps included, g/L. */
  predictedProductGPerL: z.number(),
  activityLeft: z.number(),
  profitPerH: z.number(),
  current: z.object({ setpointC: z.number(), productGPerL: z.number(), activityLeft: z.number(), profitPerH: z.number() }),
  /** Relative gain of the plan over the current setpoint. */
  gainOverCurrent: z.number(),
  /** Relative gain of the best staged profile over the best isothermal setpoint (both with ramps). */
  stagedGain: z.number(),
  boundsC: z.tuple([z.number(), z.number()]),
  /**
   * Substrate fully converted before the batch ends: the hour it completes (recommended and current programs) and
   * the profit per reactor hour of a batch ended then against the full one; null otherwise, absent on older plans.
   */
  earlyFinish: z
    .object({ completeAtH: z.number(), currentCompleteAtH: z.number().nullable(), shorterProfitPerH: z.number(), fullProfitPerH: z.number() })
    .nullable()
    .optional(),
  atBound: z.enum(['lower', 'upper']).nullable(),
  constraintsMet: z.boolean(),
  cautions: PlanCautions,
  uncertainty: z
    .object({
      draws: z.number().int(),
      seed: z.number().int(),
      parameterSpread: z.enum(['fit', 'default', 'calibration']),
      p10: z.number(),
      p50: z.number(),
      p90: z.number(),
      robustSetpointC: z.number(),
      robustP10: z.number(),
    })
    .nullable(),
  kinetics: z.object({
    tRefC: z.number(),
    vmaxRefGPerLH: z.number(),
    eaKJPerMol: z.number(),
    kdRefPerH: z.number(),
    edKJPerMol: z.number(),
    stabilitySource: z.enum(STABILITY_SOURCES),
    /** Absent on plans stored before evidence was recorded. */
    evidence: KineticsEvidence.optional(),
  }),
});
export type PlanOutputs = z.infer<typeof PlanOutputs>;

export const Plan = z.object({
  id: z.number().int(),
  recipeId: z.number().int(),
  recipeName: z.string(),
  lotCode: z.string(),
  vesselName: z.string(),
  createdAt: z.string(),
  createdBy: z.string(),
  modelVersion: z.string(),
  /** sha256 of the canonical inputs, outputs and model version: what a signature is bound to. */
  contentHash: z.string(),
  inputs: PlanInputs,
  outputs: PlanOutputs,
  /** Set when the lot has a newer assay fit or calibration than the plan was computed from; never recomputed silently. */
  olderEvidence: z.string().nullable(),
});
export type Plan = z.infer<typeof Plan>;

export const PlanList = z.object({ plans: z.array(Plan) });
export type PlanList = z.infer<typeof PlanList>;

export const PlanQuery = z.object({ recipeId: z.coerce.number().int().positive().optional() });
export type PlanQuery = z.infer<typeof PlanQuery>;
