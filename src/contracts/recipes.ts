import { z } from 'zod';
import { AssayFit } from './assays';
import { AcceptedCalibration } from './calibrations';
import { MAX_HEATING_COST_PER_DEGC_H, MAX_PRICE_PER_KG } from './rules';
import { Enzyme } from './enzymes';
import { Vessel } from './vessels';

const positive = z.number().positive('Must be more than 0');
const nonNegative = z.number().min(0, 'Must be 0 or more');
export const heatingCost = nonNegative.max(MAX_HEATING_COST_PER_DEGC_H, `At most ${MAX_HEATING_COST_PER_DEGC_H.toLocaleString('en')}`);
/** A price per kilogram; the ceiling keeps profit per hour finite. */
export const pricePerKg = nonNegative.max(MAX_PRICE_PER_KG, `At most ${MAX_PRICE_PER_KG.toLocaleString('en')} per kg`);

// The recipe's own numbers; the enzyme follows from the lot, the limits from the vessel.
export const RecipeFields = z.object({
  name: z.string().trim().min(1, 'Give the recipe a name').max(80),
  lotId: z.number().int().positive(),
  vesselId: z.number().int().positive(),
  /** Substrate charged at the start, g/L. */
  s0GPerL: positive.max(2000),
  /** Michaelis constant, g/L (taken as independent of temperature). */
  kmGPerL: positive.max(2000),
  /** Enzyme product charged, g per litre of batch. */
  doseGPerL: positive.max(1000),
  /** Maximum rate at the enzyme's reference temperature at this dose, g/L/h; scales in proportion to the dose. */
  vmaxRefGPerLH: positive.max(100000),
  /** Activation energy of inactivation used when the lot has no fitted value, kJ/mol. */
  edKJPerMol: z.number().min(20, 'Must be at least 20 kJ/mol').max(1500, 'Must be at most 1500 kJ/mol'),
  batchH: positive.max(500, 'At most 500 h'),
  turnaroundH: nonNegative.max(500),
  /** Temperature the batch is filled at; heating starts here and heating cost counts degrees above it. */
  fillC: z.number().min(-20).max(150),
  productPricePerKg: pricePerKg,
  enzymePricePerKg: pricePerKg,
  /** Heating and holding cost per (degC above the fill temperature x hour). */
  heatingCostPerDegCHour: heatingCost,
  currentSetpointC: z.number().min(-20).max(250),
});

export const RecipeInput = RecipeFields.strict();
export type RecipeInput = z.infer<typeof RecipeInput>;

// The current setpoint is the production setpoint: after creation only change control moves it.
export const RecipePatch = RecipeFields.omit({ currentSetpointC: true })
  .partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'Nothing to change');
export type RecipePatch = z.infer<typeof RecipePatch>;

export const Recipe = RecipeFields.extend({
  id: z.number().int(),
  enzymeId: z.number().int(),
  enzymeName: z.string(),
  lotCode: z.string(),
  vesselName: z.string(),
  /** Set by change control when a plan is released for this recipe. */
  releasedPlanId: z.number().int().nullable(),
  releasedAt: z.string().nullable(),
  updatedAt: z.string(),
});
export type Recipe = z.infer<typeof Recipe>;

export const RecipeList = z.object({ recipes: z.array(Recipe) });
export type RecipeList = z.infer<typeof RecipeList>;

/** The lot's newest assay fit, as planning uses it. */
export const LotFit = z.object({ assayId: z.number().int(), createdAt: z.string(), fit: AssayFit });
export type LotFit = z.infer<typeof LotFit>;

/**
 * An accepted lot as the planner uses it: the certificate's first-order kd at its temperature, the lot's assay
 * fit when it has one, and the calibration the engineer accepted for this recipe and lot.
 */
export const PlanningLot = z.object({
  id: z.number().int(),
  lotCode: z.string(),
  certKdPerH: z.number(),
  certTempC: z.number(),
  expiresOn: z.string(),
  fit: LotFit.nullable(),
  calibration: AcceptedCalibration.nullable(),
});
export type PlanningLot = z.infer<typeof PlanningLot>;

/** Everything the planner needs to compute in the browser exactly what the server will recompute. */
export const RecipeDetail = z.object({
  recipe: Recipe,
  vessel: Vessel,
  enzyme: Enzyme,
  /** Accepted lots of the recipe's enzyme, the recipe's own lot included. */
  lots: z.array(PlanningLot),
});
export type RecipeDetail = z.infer<typeof RecipeDetail>;
