import { Router, type Request } from 'express';
import { z } from 'zod';
import { IdParam, RowId } from './params';
import {
  BatchLink,
  CertificateInfo,
  LinkSettings,
  LinkSettingsPatch,
  LinkStatusList,
  TrustRequest,
  VesselSource,
  VesselSourceInput,
  VesselSourceList,
} from '../../src/contracts/control-link';
import { allow, currentUser } from '../middleware/auth';
import {
  batchLinkOf,
  changeLinkSettings,
  linkSettingsOf,
  linkStatus,
  listSources,
  removeSource,
  saveSource,
  sourceCertificate,
  trustSource,
} from '../services/control-sources';
import type { AppContext } from '../context';

const VesselParam = z.object({ vesselId: RowId });

/** Sources, trust, settings and link status of the read-only control-system link (OPC UA). */
export function controlLinkRouter(base: AppContext): Router {
  const router = Router();
  const vessel = (req: Request) => VesselParam.parse(req.params).vesselId;
  router.get('/sources', allow('control-link.configure'), async (req, res) => {
    res.json(VesselSourceList.parse({ sources: await listSources(base, currentUser(req)) }));
  });
  router.put('/sources/:vesselId', allow('control-link.configure'), async (req, res) => {
    res.json(VesselSource.parse(await saveSource(base, currentUser(req), vessel(req), VesselSourceInput.parse(req.body))));
  });
  router.delete('/sources/:vesselId', allow('control-link.configure'), async (req, res) => {
    await removeSource(base, currentUser(req), vessel(req));
    res.status(204).end();
  });
  router.get('/sources/:vesselId/server-certificate', allow('control-link.configure'), async (req, res) => {
    res.json(CertificateInfo.parse(await sourceCertificate(base, currentUser(req), vessel(req))));
  });
  router.post('/sources/:vesselId/trust', allow('control-link.configure'), async (req, res) => {
    res.json(VesselSource.parse(await trustSource(base, currentUser(req), vessel(req), TrustRequest.parse(req.body))));
  });
  router.get('/settings', allow('control-link.read'), async (req, res) => {
    res.json(LinkSettings.parse(await linkSettingsOf(base.db, currentUser(req).siteId)));
  });
  router.patch('/settings', allow('control-link.configure'), async (req, res) => {
    res.json(LinkSettings.parse(await changeLinkSettings(base, currentUser(req), LinkSettingsPatch.parse(req.body))));
  });
  router.get('/status', allow('batches.read'), async (req, res) => {
    res.json(LinkStatusList.parse(await linkStatus(base, currentUser(req))));
  });
  router.get('/batches/:id', allow('batches.read'), async (req, res) => {
    res.json(BatchLink.parse(await batchLinkOf(base, currentUser(req), IdParam.parse(req.params).id)));
  });
  return router;
}
