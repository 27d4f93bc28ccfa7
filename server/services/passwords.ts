import bcrypt from 'bcryptjs';
import crypto from 'node:crypto';
import { jwtVerify, SignJWT } from 'jose';
import { writeTx } from '../../db/client';
import type { AppContext } from '../context';
import type { ChangePassword, PasswordReset, PasswordResetPreview, SessionUser } from '../../src/contracts/session';
import { sha256 } from '../digest';
import { HttpError, notFound } from '../http-error';
import { revokeOtherSessions, revokeUserSessions } from '../repositories/sessions';
import { findSite } from '../repositories/sites';
import { findSiteUser, findUserWithSite, updateUser, type UserRow } from '../repositories/users';
import { appendAudit } from './audit';
import { hashPassword, type AuthContext } from './auth';
import { enqueueMail } from './mail';

/** How long a reset link works. A day, so a link mailed at the end of a shift still works at the next one. */
export const RESET_HOURS = 24;

/** Your own password: the current one must be right; every other session of yours ends. */
export async function changeOwnPassword(ctx: AuthContext, u: SessionUser, sessionId: string, input: ChangePassword): Promise<void> {
  const found = await findUserWithSite(ctx.db, u.id);
  if (!found || !(await bcrypt.compare(input.currentPassword, found.user.passwordHash)))
    throw new HttpError(400, 'wrong_password', 'The current password is not right', { currentPassword: 'Not your current password' });
  const passwordHash = await hashPassword(input.newPassword);
  const now = ctx.clock.now();
  await writeTx(ctx.db, async (tx) => {
    await updateUser(tx, u.id, { passwordHash });
    await revokeOtherSessions(tx, u.id, sessionId, now.toISOString());
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'user.password.change',
      entity: 'user',
      entityId: u.id,
      newValue: { otherSessionsEnded: true },
      at: now,
    });
  });
}

/*
 * A reset link is a signed token (HS256, a key derived from the session secret) naming the user, its expiry, and a
 * fingerprint of the password hash it replaces: once any new password is set the fingerprint no longer matches,
 * so each link works once, and a newer link or a password change voids the older ones. Nothing is stored.
 */
const resetKey = (secret: Uint8Array) => crypto.createHmac('sha256', secret).update('yieldpoint password reset').digest();
const fingerprint = (user: UserRow) => sha256(`${user.id}|${user.passwordHash}`, 'base64url').slice(0, 22);

export type ResetContext = AuthContext & Pick<AppContext, 'linkUrl' | 'mail'>;

/** An admin mails a reset link to one of the site's active people (through the outbox). */
export async function sendPasswordReset(ctx: ResetContext, admin: SessionUser, userId: number): Promise<{ to: string; expiresAt: string }> {
  const user = await findSiteUser(ctx.db, admin.siteId, userId);
  if (!user) throw notFound('User');
  if (!user.isActive) throw new HttpError(409, 'user_inactive', `${user.name} is deactivated; invite them again to let them back in`);
  const now = ctx.clock.now();
  const expires = new Date(now.getTime() + RESET_HOURS * 3_600_000);
  const token = await new SignJWT({ purpose: 'password-reset', fp: fingerprint(user) })
    .setProtectedHeader({ alg: 'HS256' })
    .setSubject(String(user.id))
    .setIssuedAt(Math.floor(now.getTime() / 1000))
    .setExpirationTime(Math.floor(expires.getTime() / 1000))
    .sign(resetKey(ctx.auth.secret));
  const site = await findSite(ctx.db, admin.siteId);
  await writeTx(ctx.db, async (tx) => {
    await enqueueMail(tx, {
      siteId: admin.siteId,
      to: user.email,
      kind: 'password-reset',
      subject: `Set a new Yieldpoint password for ${site?.name ?? 'your site'}`,
      text: [
        `${admin.name} sent you a link to set a new password for Yieldpoint at ${site?.name ?? 'your site'}.`,
        '',
        `It works once, until ${expires.toISOString().slice(0, 16).replace('T', ' ')} UTC:`,
        `${ctx.linkUrl}/reset-password?token=${token}`,
        '',
        'If you did not ask for this, ignore this message; your password stays as it is.',
      ].join('\n'),
      at: now,
    });
    await appendAudit(tx, {
      siteId: admin.siteId,
      userId: admin.id,
      actor: admin.email,
      action: 'user.password-reset.send',
      entity: 'user',
      entityId: user.id,
      newValue: { to: user.email, expiresAt: expires.toISOString() },
      at: now,
    });
  });
  ctx.mail?.kick();
  return { to: user.email, expiresAt: expires.toISOString() };
}

async function openReset(ctx: AuthContext, token: string): Promise<{ user: UserRow; expiresAt: string }> {
  let claims: { sub?: string; fp?: unknown; purpose?: unknown; exp?: number };
  try {
    ({ payload: claims } = await jwtVerify(token, resetKey(ctx.auth.secret), { algorithms: ['HS256'], currentDate: ctx.clock.now() }));
  } catch (e) {
    const expired = (e as { code?: string }).code === 'ERR_JWT_EXPIRED';
    throw new HttpError(
      expired ? 410 : 404,
      expired ? 'reset_expired' : 'reset_not_found',
      expired ? 'This reset link has expired. Ask your site admin for a new one.' : 'This reset link is not valid. Ask your site admin for a new one.',
    );
  }
  const found = claims.purpose === 'password-reset' && claims.sub ? await findUserWithSite(ctx.db, Number(claims.sub)) : undefined;
  if (!found || !found.user.isActive) throw new HttpError(404, 'reset_not_found', 'This reset link is not valid. Ask your site admin for a new one.');
  if (claims.fp !== fingerprint(found.user))
    throw new HttpError(
      410,
      'reset_used',
      'This reset link was already used, or a newer password was set since. Sign in, or ask your site admin for a new link.',
    );
  return { user: found.user, expiresAt: new Date((claims.exp ?? 0) * 1000).toISOString() };
}

export async function previewReset(ctx: AuthContext, token: string): Promise<PasswordResetPreview> {
  const { user, expiresAt } = await openReset(ctx, token);
  return { email: user.email, expiresAt };
}

/** Sets the new password from a reset link; every session of that person ends. */
export async function resetPassword(ctx: AuthContext, input: PasswordReset): Promise<{ email: string }> {
  const { user } = await openReset(ctx, input.token);
  const passwordHash = await hashPassword(input.password);
  const now = ctx.clock.now();
  await writeTx(ctx.db, async (tx) => {
    // Read again after the slow hash: the same link submitted twice sets one password.
    const current = await findSiteUser(tx, user.siteId, user.id);
    if (!current || fingerprint(current) !== fingerprint(user))
      throw new HttpError(410, 'reset_used', 'This reset link was already used. Sign in with your new password.');
    await updateUser(tx, user.id, { passwordHash });
    await revokeUserSessions(tx, user.id, now.toISOString());
    await appendAudit(tx, {
      siteId: user.siteId,
      userId: user.id,
      actor: user.email,
      action: 'user.password-reset.use',
      entity: 'user',
      entityId: user.id,
      newValue: { sessionsEnded: true },
      at: now,
    });
  });
  return { email: user.email };
}
