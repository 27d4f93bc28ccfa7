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
  router.get('/', allow('calibrations.read'), (req, res) => {
    res.json(CalibrationView.parse(getCalibrationView(s, currentUser(req), CalibrationQuery.parse(req.query))));
  });
  router.get('/settings', allow('calibrations.read'), (req, res) => {
    res.json(CalibrationSettings.parse(calibrationSettingsOf(s.db, currentUser(req).siteId)));
  });
  router.patch('/settings', allow('calibrations.settings'), (req, res) => {
    res.json(CalibrationSettings.parse(changeCalibrationSettings(s, currentUser(req), CalibrationSettingsPatch.parse(req.body))));
  });
  router.post('/:id/accept', allow('calibrations.decide'), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Calibration.parse(acceptCalibration(s, currentUser(req), id, CalibrationAccept.parse(req.body ?? {}))));
  });
  router.post('/exclusions', allow('calibrations.decide'), (req, res) => {
    res.json(CalibrationView.parse(setExclusion(s, currentUser(req), CalibrationExclusion.parse(req.body))));
  });
  return router;
}
