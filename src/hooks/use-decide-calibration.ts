import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Calibration, CalibrationAccept, CalibrationExclusion, CalibrationView } from '../contracts/calibrations';
import { useSubmit } from './use-submit';

// Accepting a calibration moves what the planner computes (the recipe's lots carry it) and makes stored plans older.
const CHANGED = ['/calibrations', keys.recipes, '/plans'];

export const useAcceptCalibration = () =>
  useSubmit((id: number, body: CalibrationAccept) => api<Calibration>(`/calibrations/${id}/accept`, { method: 'POST', body }), CHANGED);

/** Leaves a closed batch out of calibration, or takes it back in, with a reason; the server proposes anew. */
export const useExcludeBatch = () =>
  useSubmit((body: CalibrationExclusion) => api<CalibrationView>('/calibrations/exclusions', { method: 'POST', body }), CHANGED);
