import { Router } from 'express';
import { AuditCheckpointInput, AuditCheckpointsWritten, AuditPage, AuditQuery, AuditVerification } from '../../src/contracts/audit-events';
import { allow, currentUser } from '../middleware/auth';
import { auditCsv, checkpointSiteAudit, searchAudit, verifySiteAudit } from '../services/audit-events';
import type { AppContext } from '../context';

export function auditEventsRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('audit-events.review'), async (req, res) => {
    res.json(AuditPage.parse(await searchAudit(s, currentUser(req), AuditQuery.parse(req.query))));
  });
  router.get('/verify', allow('audit-events.review'), async (req, res) => {
    res.json(AuditVerification.parse(await verifySiteAudit(s, currentUser(req))));
  });
  router.post('/checkpoints', allow('audit-events.review'), async (req, res) => {
    AuditCheckpointInput.parse(req.body);
    res.status(201).json(AuditCheckpointsWritten.parse(await checkpointSiteAudit(s, currentUser(req))));
  });
  router.get('/export.csv', allow('audit-events.review'), async (req, res) => {
    const csv = await auditCsv(s, currentUser(req), AuditQuery.parse(req.query));
    res
      .type('text/csv')
      .attachment(`audit-trail-${s.clock.now().toISOString().slice(0, 10)}.csv`)
      .send(csv);
  });
  return router;
}
