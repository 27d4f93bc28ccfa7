import crypto from 'node:crypto';
import { writeTx, type Db } from '../../db/client';
import type { AcceptInvite, CreateInvite, Invite, InviteAccepted, InvitePreview, InviteList } from '../../src/contracts/invites';
import { ROLE_LABELS } from '../../src/contracts/roles';
import type { SessionUser } from '../../src/contracts/session';
import type { AppContext } from '../context';
import { sha256 } from '../digest';
import { HttpError, notFound } from '../http-error';
import {
  findInviteByTokenHash,
  findOpenInviteByEmail,
  findSiteInvite,
  insertInvite,
  listOpenInvites,
  updateInvite,
  type InviteRow,
} from '../repositories/billing';
import { findSite } from '../repositories/sites';
import { revokeUserSessions } from '../repositories/sessions';
import { findUserByEmail, insertUser, updateUser } from '../repositories/users';
import { appendAudit } from './audit';
import { hashPassword } from './auth';
import { assertFreeSeat, assertWritable } from './billing';
import { enqueueMail } from './mail';

export type InviteContext = Pick<AppContext, 'db' | 'clock' | 'linkUrl' | 'mail'>;

export const INVITE_DAYS = 7;

const hashToken = (token: string) => sha256(token);
const toInvite = (r: InviteRow): Invite => ({ id: r.id, email: r.email, role: r.role, createdAt: r.createdAt, expiresAt: r.expiresAt });

export const listInvites = async ({ db, clock }: InviteContext, actor: SessionUser): Promise<InviteList> => ({
  invites: (await listOpenInvites(db, actor.siteId, clock.now().toISOString())).map(toInvite),
});

/** Reserves a seat for the invited address and mails them a one-time link (through the outbox). */
export async function createInvite(ctx: InviteContext, actor: SessionUser, req: CreateInvite): Promise<Invite> {
  const now = ctx.clock.now();
  // Only this site's own people are named: an address in use at another site is invited like any other (its owner
  // learns at the link that it is taken), so one site cannot find out who works at another.
  const existing = await findUserByEmail(ctx.db, req.email);
  if (existing?.siteId === actor.siteId && existing.isActive)
    throw new HttpError(409, 'email_taken', 'This person already signs in at this site; to let them back in, send a password reset from the Site screen', {
      email: 'Already a user at this site',
    });
  if (await findOpenInviteByEmail(ctx.db, req.email, now.toISOString()))
    throw new HttpError(409, 'already_invited', 'This address already has an open invite', { email: 'Already invited' });
  const site = await findSite(ctx.db, actor.siteId);
  if (!site) throw notFound('Site');
  const token = crypto.randomBytes(32).toString('base64url');
  const expiresAt = new Date(now.getTime() + INVITE_DAYS * 86_400_000);
  const link = `${ctx.linkUrl}/accept-invite?token=${token}`;
  const invite = await writeTx(ctx.db, async (tx) => {
    // Checked inside the transaction: two invites racing for the last seat cannot both take it.
    await assertFreeSeat(tx, actor.siteId, now);
    const row = await insertInvite(tx, {
      siteId: actor.siteId,
      email: req.email,
      role: req.role,
      tokenHash: hashToken(token),
      invitedBy: actor.id,
      expiresAt: expiresAt.toISOString(),
      createdAt: now.toISOString(),
    });
    await enqueueMail(tx, {
      siteId: actor.siteId,
      to: req.email,
      kind: 'invite',
      subject: `${actor.name} invited you to Yieldpoint at ${site.name}`,
      text: [
        `${actor.name} invited you to use Yieldpoint at ${site.name} as ${ROLE_LABELS[req.role]}.`,
        '',
        `Choose your password here (the link works once, until ${expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC):`,
        link,
        '',
        'If you did not expect this, ignore this message.',
      ].join('\n'),
      at: now,
    });
    await appendAudit(tx, {
      siteId: actor.siteId,
      userId: actor.id,
      actor: actor.email,
      action: 'invite.create',
      entity: 'invite',
      entityId: row.id,
      newValue: { email: req.email, role: req.role, expiresAt: row.expiresAt },
      at: now,
    });
    return row;
  });
  ctx.mail?.kick();
  return toInvite(invite);
}

export async function revokeInvite({ db, clock }: InviteContext, actor: SessionUser, id: number): Promise<void> {
  const row = await findSiteInvite(db, actor.siteId, id);
  if (!row || row.acceptedAt || row.revokedAt) throw notFound('Invite');
  const now = clock.now();
  await writeTx(db, async (tx) => {
    await updateInvite(tx, id, { revokedAt: now.toISOString() });
    await appendAudit(tx, {
      siteId: actor.siteId,
      userId: actor.id,
      actor: actor.email,
      action: 'invite.revoke',
      entity: 'invite',
      entityId: id,
      oldValue: { email: row.email, role: row.role },
      at: now,
    });
  });
}

async function openInvite(db: Db, token: string, now: Date): Promise<InviteRow> {
  const row = await findInviteByTokenHash(db, hashToken(token));
  if (!row || row.revokedAt) throw new HttpError(404, 'invite_not_found', 'This invite link is not valid. Ask your site admin for a new one.');
  if (row.acceptedAt) throw new HttpError(410, 'invite_used', 'This invite was already used. Sign in with your e-mail and password.');
  if (new Date(row.expiresAt) <= now) throw new HttpError(410, 'invite_expired', 'This invite has expired. Ask your site admin for a new one.');
  return row;
}

export async function previewInvite({ db, clock }: InviteContext, token: string): Promise<InvitePreview> {
  const row = await openInvite(db, token, clock.now());
  return { email: row.email, role: row.role, siteName: (await findSite(db, row.siteId))?.name ?? '', expiresAt: row.expiresAt };
}

/** Creates the invited user with the password they chose; they then sign in as anyone does. */
export async function acceptInvite({ db, clock }: InviteContext, req: AcceptInvite): Promise<InviteAccepted> {
  const first = await openInvite(db, req.token, clock.now());
  const passwordHash = await hashPassword(req.password);
  const now = clock.now();
  return writeTx(db, async (tx) => {
    // Read again after the slow hash: a second submit of the same link may have won meanwhile.
    const row = await openInvite(tx, req.token, now);
    if (row.id !== first.id) throw new HttpError(409, 'invite_changed', 'This invite changed; open the link again');
    await assertWritable(tx, row.siteId, now);
    const existing = await findUserByEmail(tx, row.email);
    // Told only to the address's owner, who opened the link from their own mail.
    if (existing && (existing.siteId !== row.siteId || existing.isActive))
      throw new HttpError(
        409,
        'email_taken',
        'This e-mail address already has a Yieldpoint sign-in. Sign in with it, or ask for an invite to another address.',
      );
    // A person of this site who lost access (deactivated) comes back with the invite's role and a new password.
    const user = existing
      ? await updateUser(tx, existing.id, { name: req.name, role: row.role, isActive: true, passwordHash })
      : await insertUser(tx, { siteId: row.siteId, email: row.email, name: req.name, role: row.role, passwordHash });
    if (existing) await revokeUserSessions(tx, existing.id, now.toISOString());
    await updateInvite(tx, row.id, { acceptedAt: now.toISOString(), userId: user.id });
    await appendAudit(tx, {
      siteId: row.siteId,
      userId: user.id,
      actor: row.email,
      action: 'invite.accept',
      entity: 'user',
      entityId: user.id,
      newValue: { email: row.email, role: row.role, name: req.name, invite: row.id, ...(existing ? { reactivated: true } : {}) },
      at: now,
    });
    return { email: user.email };
  });
}
