import type { RequestHandler } from 'express';
import { writeTx, type Db } from '../../db/client';
import type { Clock } from '../clock';
import { appendAudit } from '../services/audit';

/**
 * Records every refused call (401 signed out, 403 wrong role or cross-site) once the answer is sent.
 * Failed sign-ins are audited by the sign-in itself with their reason.
 */
export function auditDenials(ctx: { db: Db; clock: Clock }): RequestHandler {
  return (req, res, next) => {
    res.on('finish', () => {
      if (res.statusCode !== 401 && res.statusCode !== 403) return;
      if (req.method === 'POST' && req.baseUrl + req.path === '/api/session') return;
      const user = req.user;
      writeTx(ctx.db, (tx) =>
        appendAudit(tx, {
          siteId: user?.siteId ?? null,
          userId: user?.id ?? null,
          actor: user?.email ?? `anonymous@${req.ip ?? 'unknown'}`,
          action: 'access.denied',
          entity: 'route',
          entityId: `${req.method} ${req.originalUrl.split('?')[0]}`,
          newValue: { status: res.statusCode, role: user?.role ?? null },
          at: ctx.clock.now(),
        }),
      );
    });
    next();
  };
}
