import { calibrationKey } from '../api/keys';
import type { CalibrationView } from '../contracts/calibrations';
import { useResource } from './use-resource';

/** The proposal, the calibration in use and the model-quality figures of a recipe and lot; `null` skips the read. */
export const useCalibration = (recipeId: number | null, lotId: number | null) =>
  useResource<CalibrationView>(recipeId && lotId ? calibrationKey(recipeId, lotId) : null);
