import type { Request, RequestHandler } from 'express';
import { DatabaseUnwritable, writeTx } from '../../db/client';
import type { Services } from '../context';
import { appendAudit, type AuditInput } from '../services/audit';

// What one refused request may add to the audit trail, which can never shrink without breaking its chain.
export const DENIAL_LIMITS = {
  /** Characters of the refused path that are stored; the rest is marked as cut. */
  pathChars: 200,
  /** Characters of the caller's name or address that are stored. */
  actorChars: 100,
  /** Callers (addresses or users) recorded one by one per minute; further ones share a single record. */
  callersPerMinute: 100,
} as const;

const MINUTE_MS = 60_000;
const cut = (s: string, n: number) => (s.length > n ? `${s.slice(0, n)}… (${s.length} characters)` : s);

type Repeats = {
  first: AuditInput;
  count: number;
  statuses: Record<string, number>;
  lastRoute: string;
};

/**
 * Records every refused call (401 signed out, 403 wrong role or cross-site) once the answer is sent. The first
 * refusal of a caller (an address when signed out, else the user) in a minute is an event of its own; further
 * ones in that minute are counted and written as one `access.denied.repeated` event when the minute is over, so
 * anonymous traffic grows the trail by a bounded amount. Failed sign-ins are audited by the sign-in itself.
 * Recording is best effort: a write that fails is logged and never reaches the request or the process.
 */
export function auditDenials(ctx: Services): RequestHandler {
  let minute = -1;
  let repeats = new Map<string, Repeats>();

  const write = async (event: AuditInput) => {
    try {
      await writeTx(ctx.db, (tx) => appendAudit(tx, event));
    } catch (err) {
      // writeTx has already logged that the file is not writable.
      if (!(err instanceof DatabaseUnwritable)) console.error(`[${new Date().toISOString()}] could not record a refused request`, err);
    }
  };

  const closeMinute = async (now: Date) => {
    const current = Math.floor(now.getTime() / MINUTE_MS);
    if (current === minute) return;
    const ended = repeats;
    const from = minute * MINUTE_MS;
    minute = current;
    repeats = new Map();
    for (const r of ended.values()) {
      if (r.count === 0) continue;
      await write({
        ...r.first,
        action: 'access.denied.repeated',
        entityId: r.lastRoute,
        newValue: { count: r.count, statuses: r.statuses, from: new Date(from).toISOString(), to: new Date(from + MINUTE_MS).toISOString() },
        at: now,
      });
    }
  };

  // A quiet minute after a burst still gets its count written.
  const timer = setInterval(() => closeMinute(ctx.clock.now()), MINUTE_MS);
  (timer as unknown as { unref?: () => void }).unref?.();

  const record = async (req: Request, status: number) => {
    const now = ctx.clock.now();
    await closeMinute(now);
    const user = req.user;
    const route = cut(`${req.method} ${req.originalUrl.split('?')[0]}`, DENIAL_LIMITS.pathChars);
    let key = user ? `user:${user.id}` : `address:${req.ip ?? 'unknown'}`;
    if (!repeats.has(key) && repeats.size >= DENIAL_LIMITS.callersPerMinute) key = 'many';
    const known = repeats.get(key);
    if (known) {
      known.count++;
      known.statuses[status] = (known.statuses[status] ?? 0) + 1;
      known.lastRoute = route;
      return;
    }
    const first: AuditInput = {
      siteId: key === 'many' ? null : (user?.siteId ?? null),
      userId: key === 'many' ? null : (user?.id ?? null),
      actor:
        key === 'many'
          ? `more than ${DENIAL_LIMITS.callersPerMinute} callers this minute`
          : cut(user?.email ?? `anonymous@${req.ip ?? 'unknown'}`, DENIAL_LIMITS.actorChars),
      action: 'access.denied',
      entity: 'route',
      entityId: route,
      newValue: { status, role: key === 'many' ? null : (user?.role ?? null) },
      at: now,
    };
    repeats.set(key, { first, count: 0, statuses: {}, lastRoute: route });
    await write(first);
  };

  return (req, res, next) => {
    res.on('finish', async () => {
      if (res.statusCode !== 401 && res.statusCode !== 403) return;
      if (req.method === 'POST' && req.baseUrl + req.path === '/api/session') return;
      try {
        await record(req, res.statusCode);
      } catch (err) {
        console.error(`[${new Date().toISOString()}] could not record a refused request`, err);
      }
    });
    next();
  };
}
