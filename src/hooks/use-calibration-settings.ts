import { api } from '../api/client';
import { keys } from '../api/keys';
import type { CalibrationSettings, CalibrationSettingsPatch } from '../contracts/calibrations';
import { useResource } from './use-resource';
import { useSubmit } from './use-submit';

/** The site's measurement spread for calibration (relative sd of a measured product). */
export const useCalibrationSettings = () => useResource<CalibrationSettings>(keys.calibrationSettings);

/** The admin changes it; the calibration views are read again (their next proposal uses it). */
export const useUpdateCalibrationSettings = () =>
  useSubmit((body: CalibrationSettingsPatch) => api<CalibrationSettings>(keys.calibrationSettings, { method: 'PATCH', body }), ['/calibrations']);
