import type { RequestHandler } from 'express';
import type { Services } from '../context';
import { assertWritable } from '../services/billing';

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);
// Signing in and out, and paying, must keep working on a read-only site: paying is the way out of it.
const ALWAYS_OPEN = ['/session', '/billing'];

/** Refuses writes of signed-in users on a site that is read-only after a failed payment (402 site_read_only). */
export function requireWritableSite(ctx: Services): RequestHandler {
  return async (req, _res, next) => {
    if (SAFE.has(req.method) || !req.user || ALWAYS_OPEN.some((p) => req.path === p || req.path.startsWith(`${p}/`))) return next();
    await assertWritable(ctx.db, req.user.siteId, ctx.clock.now());
    next();
  };
}
