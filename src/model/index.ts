export { MODEL_VERSION, R, KELVIN_OFFSET } from './constants';
export { ModelInputError, ModelCancelledError } from './errors';
export type { StableFraction, EnzymeParams, Substrate, Stage, Reading, TemperatureInput, BatchState, SimulationResult, TrajectoryPoint } from './types';
export * from './units';
export { wrightOmega, lambertW0, lambertWm1 } from './lambert-w';
export { vmaxAt, kdAt, arrheniusFactor, activeFraction, eyringRatePerS, twoFractionResidual, firstOrderResidual, observedKdRefPerH } from './kinetics';
export { convert, type ConvertInput, type ConvertResult } from './convert';
export { simulate, trajectory, temperatureAt, productFromWork } from './batch';
export {
  optimizeSetpoint,
  optimalSetpointC,
  optimizeProfile,
  stagesWithRamps,
  isothermalOptimumU,
  workOfStages,
  type SetpointOptimum,
  type ProfileOptimum,
  type BoundSide,
} from './optimise';
export { initialRateOptimumC } from './initial-rate';
export {
  economics,
  optimizeEconomics,
  profitCurve,
  profitSetpointC,
  degreeHoursAbove,
  type EconomicsParams,
  type EconomicsResult,
  type EconomicOptimum,
} from './economics';
export {
  monteCarlo,
  monteCarloSteps,
  MAX_CANDIDATES,
  MAX_EVALUATIONS,
  type UncertaintyInput,
  type UncertaintyResult,
  type ChunkOptions,
  type Percentiles,
} from './uncertainty';
export { createRng, cholesky, quantileSorted, quantilesBySelection, type Rng } from './random';
export {
  fitInactivation,
  twoStepInactivation,
  fitInitialRates,
  residualScale,
  type InactivationPoint,
  type InactivationFit,
  type InactivationModelFit,
  type InactivationModelName,
  type ErrorModel,
  type TwoStepEstimate,
  type InitialRatePoint,
  type InitialRateFit,
} from './fit';
export { halfLifeAt } from './half-life';
export { studentTQuantile, studentTCdf } from './stats';
export { thermalDose, type DoseResult } from './dose';
export { waterSaturationPressureKPa, pressureCaution } from './safety';
export * from './validate';
export { calibrate, OUTLIER_LIMIT, type CalibrationInput, type CalibrationBatch, type CalibrationResult, type CalibratedBatch } from './calibrate';
export { productSensitivity, type ProductSensitivity } from './sensitivity';
export { validateCalibrateInput } from './validate-calibrate';
