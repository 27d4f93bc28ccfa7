import { Router } from 'express';
import { IdParam } from './params';
import {
  Calibration,
  CalibrationAccept,
  CalibrationExclusion,
  CalibrationQuery,
  CalibrationSettings,
  CalibrationSettingsPatch,
  CalibrationView,
} from '../../src/contracts/calibrations';
import { allow, currentUser } from '../middleware/auth';
import { acceptCalibration, calibrationSettingsOf, changeCalibrationSettings, getCalibrationView, setExclusion } from '../services/calibrations';
import type { AppContext } from '../context';

export function calibrationsRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('calibrations.read'), async (req, res) => {
    res.json(CalibrationView.parse(await getCalibrationView(s, currentUser(req), CalibrationQuery.parse(req.query))));
  });
  router.get('/settings', allow('calibrations.read'), async (req, res) => {
    res.json(CalibrationSettings.parse(await calibrationSettingsOf(s.db, currentUser(req).siteId)));
  });
  router.patch('/settings', allow('calibrations.settings'), async (req, res) => {
    res.json(CalibrationSettings.parse(await changeCalibrationSettings(s, currentUser(req), CalibrationSettingsPatch.parse(req.body))));
  });
  router.post('/:id/accept', allow('calibrations.decide'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Calibration.parse(await acceptCalibration(s, currentUser(req), id, CalibrationAccept.parse(req.body ?? {}))));
  });
  router.post('/exclusions', allow('calibrations.decide'), async (req, res) => {
    res.json(CalibrationView.parse(await setExclusion(s, currentUser(req), CalibrationExclusion.parse(req.body))));
  });
  return router;
}
