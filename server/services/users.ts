import { writeTx } from '../../db/client';
import type { SessionUser } from '../../src/contracts/session';
import type { UpdateUser, User } from '../../src/contracts/users';
import type { Services } from '../context';
import { HttpError, notFound } from '../http-error';
import { revokeUserSessions } from '../repositories/sessions';
import { findSiteUser, listSiteUsers, updateUser, type UserRow } from '../repositories/users';
import { appendAudit } from './audit';
import { assertFreeSeat } from './billing';

const toUser = (u: UserRow): User => ({ id: u.id, email: u.email, name: u.name, role: u.role, isActive: u.isActive, createdAt: u.createdAt });

export const listUsers = async ({ db }: Services, actor: SessionUser): Promise<User[]> => (await listSiteUsers(db, actor.siteId)).map(toUser);

/** Changes a user's role, name or activity; a role change or deactivation ends their sessions at once. */
export async function changeUser({ db, clock }: Services, actor: SessionUser, id: number, patch: UpdateUser): Promise<User> {
  const before = await findSiteUser(db, actor.siteId, id);
  if (!before) throw notFound('User');
  if (before.id === actor.id && (patch.role !== undefined || patch.isActive === false)) {
    throw new HttpError(409, 'own_account', 'You cannot change your own role or deactivate yourself');
  }
  const now = clock.now();
  return writeTx(db, async (tx) => {
    // Reactivating takes a seat like a new user does.
    if (patch.isActive === true && !before.isActive) await assertFreeSeat(tx, actor.siteId, now);
    const after = await updateUser(tx, id, patch);
    if ((patch.role && patch.role !== before.role) || patch.isActive === false) await revokeUserSessions(tx, id, now.toISOString());
    await appendAudit(tx, {
      siteId: actor.siteId,
      userId: actor.id,
      actor: actor.email,
      action: 'user.update',
      entity: 'user',
      entityId: id,
      oldValue: { role: before.role, isActive: before.isActive, name: before.name },
      newValue: { role: after.role, isActive: after.isActive, name: after.name },
      at: now,
    });
    return toUser(after);
  });
}

export async function acknowledgeCautions({ db, clock }: Services, actor: SessionUser): Promise<void> {
  if (actor.cautionsAcknowledgedAt) return;
  const now = clock.now();
  await writeTx(db, async (tx) => {
    await updateUser(tx, actor.id, { cautionsAcknowledgedAt: now.toISOString() });
    await appendAudit(tx, {
      siteId: actor.siteId,
      userId: actor.id,
      actor: actor.email,
      action: 'cautions.acknowledge',
      entity: 'user',
      entityId: actor.id,
      at: now,
    });
  });
}
