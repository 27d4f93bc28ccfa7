import bcrypt from 'bcryptjs';
import crypto, { createSecretKey, type KeyObject } from 'node:crypto';
import { jwtVerify, SignJWT } from 'jose';
import { DatabaseUnwritable, writeTx, type Db } from '../../db/client';
import type { SessionUser, SignInRequest } from '../../src/contracts/session';
import type { AppContext } from '../context';
import { HttpError } from '../http-error';
import { insertSession, revokeSession, sessionWithUserNow, touchSession } from '../repositories/sessions';
import { findUserByEmail, findUserWithSite, type UserRow } from '../repositories/users';
import { appendAudit } from './audit';

export const BCRYPT_COST = 12;

export type AuthContext = Pick<AppContext, 'db' | 'clock' | 'auth'>;

// Compared against when the e-mail is unknown, so a wrong address costs the same time as a wrong password.
const DUMMY_HASH = bcrypt.hashSync('yieldpoint-no-such-user', BCRYPT_COST);

export const hashPassword = (password: string) => bcrypt.hash(password, BCRYPT_COST);

// jose imports a raw secret on every call; a KeyObject made once per secret saves that on every request.
const keyObjects = new WeakMap<Uint8Array, KeyObject>();
function sessionKey(secret: Uint8Array): KeyObject {
  let key = keyObjects.get(secret);
  if (!key) keyObjects.set(secret, (key = createSecretKey(secret)));
  return key;
}

type Claims = { sid: string; sub: string; expMs: number };
// The same token verifies the same way every time, so its claims are remembered (per secret, bounded) instead of
// checking the signature on every request. Expiry is still checked here, and the session row on every request.
const verifiedTokens = new WeakMap<Uint8Array, Map<string, Claims>>();
const MAX_VERIFIED_TOKENS = 10_000;

async function verifiedClaims(secret: Uint8Array, token: string, now: Date): Promise<Claims | null> {
  let known = verifiedTokens.get(secret);
  if (!known) verifiedTokens.set(secret, (known = new Map()));
  const hit = known.get(token);
  if (hit) return hit.expMs > now.getTime() ? hit : null;
  try {
    const { payload } = await jwtVerify(token, sessionKey(secret), { algorithms: ['HS256'], currentDate: now });
    if (typeof payload.sid !== 'string' || !payload.sub || typeof payload.exp !== 'number') return null;
    const claims = { sid: payload.sid, sub: payload.sub, expMs: payload.exp * 1000 };
    if (known.size >= MAX_VERIFIED_TOKENS) known.clear();
    known.set(token, claims);
    return claims;
  } catch {
    return null;
  }
}

/** Checks a password and opens a server-side session; the JWT only names that session. */
export async function signIn(ctx: AuthContext, req: SignInRequest, from: string): Promise<{ token: string; expiresAt: Date; user: SessionUser }> {
  const { db, clock } = ctx;
  const user = await findUserByEmail(db, req.email);
  const ok = await bcrypt.compare(req.password, user?.passwordHash ?? DUMMY_HASH);
  const now = clock.now();
  if (!user || !ok || !user.isActive) {
    await writeTx(db, (tx) =>
      appendAudit(tx, {
        siteId: user?.siteId ?? null,
        userId: user?.id ?? null,
        actor: req.email,
        action: 'sign-in.failed',
        entity: 'session',
        newValue: { from, reason: !user ? 'unknown e-mail' : !ok ? 'wrong password' : 'user deactivated' },
        at: now,
      }),
    );
    throw new HttpError(401, 'bad_credentials', 'E-mail or password is not right');
  }
  const sessionId = crypto.randomBytes(24).toString('base64url');
  const expiresAt = new Date(now.getTime() + ctx.auth.absoluteHours * 3_600_000);
  await writeTx(db, async (tx) => {
    await insertSession(tx, {
      id: sessionId,
      userId: user.id,
      role: user.role,
      createdAt: now.toISOString(),
      lastSeenAt: now.toISOString(),
      expiresAt: expiresAt.toISOString(),
    });
    await appendAudit(tx, { siteId: user.siteId, userId: user.id, actor: user.email, action: 'sign-in', entity: 'session', newValue: { from }, at: now });
  });
  const token = await new SignJWT({ sid: sessionId })
    .setProtectedHeader({ alg: 'HS256' })
    .setSubject(String(user.id))
    .setIssuedAt(Math.floor(now.getTime() / 1000))
    .setExpirationTime(Math.floor(expiresAt.getTime() / 1000))
    .sign(sessionKey(ctx.auth.secret));
  return { token, expiresAt, user: (await loadSessionUser(db, user.id))! };
}

export async function loadSessionUser(db: Db, userId: number): Promise<SessionUser | null> {
  const found = await findUserWithSite(db, userId);
  return found ? toSessionUser(found) : null;
}

function toSessionUser({
  user,
  siteName,
  siteTimeZone,
  siteCurrency,
}: {
  user: UserRow;
  siteName: string;
  siteTimeZone: string;
  siteCurrency: string;
}): SessionUser | null {
  if (!user.isActive) return null;
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    siteId: user.siteId,
    siteName,
    siteTimeZone,
    siteCurrency,
    cautionsAcknowledgedAt: user.cautionsAcknowledgedAt,
  };
}

/**
 * Resolves a cookie's token to its user, or null. The session row decides: a revoked, expired or idle
 * session, a deactivated user, or a role changed since sign-in all end it at once.
 */
export async function resolveSession(ctx: AuthContext, token: string): Promise<{ sessionId: string; user: SessionUser } | null> {
  const now = ctx.clock.now();
  const claims = await verifiedClaims(ctx.auth.secret, token, now);
  if (!claims) return null;
  const { sid, sub } = claims;
  const found = await sessionWithUserNow(ctx.db, sid);
  if (!found) return null;
  const { session } = found;
  if (session.revokedAt || String(session.userId) !== sub) return null;
  if (new Date(session.expiresAt) <= now) return null;
  if (now.getTime() - new Date(session.lastSeenAt).getTime() > ctx.auth.idleMinutes * 60_000) return null;
  const user = toSessionUser(found);
  if (!user || user.role !== session.role) return null;
  // Writing on every request would serialise reads behind the writer; a minute's resolution is enough.
  if (now.getTime() - new Date(session.lastSeenAt).getTime() > 60_000) await touchQuietly(ctx.db, sid, now);
  return { sessionId: sid, user };
}

// Only the idle timeout needs it: a file that cannot be written must not turn a read into an error.
async function touchQuietly(db: Db, sid: string, now: Date): Promise<void> {
  try {
    await writeTx(db, (tx) => touchSession(tx, sid, now.toISOString()));
  } catch (err) {
    if (!(err instanceof DatabaseUnwritable)) throw err;
  }
}

export async function signOut(ctx: AuthContext, sessionId: string, user: SessionUser): Promise<void> {
  const now = ctx.clock.now();
  await writeTx(ctx.db, async (tx) => {
    await revokeSession(tx, sessionId, now.toISOString());
    await appendAudit(tx, { siteId: user.siteId, userId: user.id, actor: user.email, action: 'sign-out', entity: 'session', at: now });
  });
}
