import { and, asc, desc, eq, ne } from 'drizzle-orm';
import { first, returned, type Db } from '../../db/client';
import { changeRequests, plans, recipes, signatures, users, vessels } from '../../db/tables';
import type { ChangeStatus, SetpointSide } from '../../src/contracts/change-requests';

export type ChangeRequestRow = typeof changeRequests.$inferSelect;
export type SignatureRow = typeof signatures.$inferSelect;

const joined = (db: Db) =>
  db
    .select({ request: changeRequests, recipeName: recipes.name, vesselName: vessels.name, proposedBy: users.name, proposedSetpointC: plans.setpointC })
    .from(changeRequests)
    .innerJoin(recipes, eq(changeRequests.recipeId, recipes.id))
    .innerJoin(vessels, eq(recipes.vesselId, vessels.id))
    .innerJoin(users, eq(changeRequests.proposedBy, users.id))
    .innerJoin(plans, eq(changeRequests.planId, plans.id));

export type ChangeRequestJoined = NonNullable<Awaited<ReturnType<typeof findSiteChangeRequest>>>;

export const findSiteChangeRequest = (db: Db, siteId: number, id: number) =>
  joined(db)
    .where(and(eq(changeRequests.siteId, siteId), eq(changeRequests.id, id)))
    .then(first);

export const listSiteChangeRequests = (db: Db, siteId: number, status?: ChangeStatus) =>
  joined(db)
    .where(status ? and(eq(changeRequests.siteId, siteId), eq(changeRequests.status, status)) : eq(changeRequests.siteId, siteId))
    .orderBy(desc(changeRequests.id))
    .limit(200)
    .execute();

export const insertChangeRequest = (db: Db, row: Omit<typeof changeRequests.$inferInsert, 'id'>) =>
  db.insert(changeRequests).values(row).returning().then(returned);

export const decideChangeRequest = (db: Db, id: number, status: ChangeStatus, decidedAt: string, replaced: SetpointSide, supersededBy: number | null = null) =>
  db.update(changeRequests).set({ status, decidedAt, replaced, supersededBy }).where(eq(changeRequests.id, id)).returning().then(returned);

/** The recipe's requests still waiting for sign-off, other than `exceptId`. */
export const listWaitingForRecipe = (db: Db, siteId: number, recipeId: number, exceptId: number) =>
  db
    .select()
    .from(changeRequests)
    .where(
      and(eq(changeRequests.siteId, siteId), eq(changeRequests.recipeId, recipeId), eq(changeRequests.status, 'proposed'), ne(changeRequests.id, exceptId)),
    )
    .execute();

// Insert only: a signature is never edited or removed.
export const insertSignature = (db: Db, row: Omit<typeof signatures.$inferInsert, 'id'>) => db.insert(signatures).values(row).returning().then(returned);

export const listSignatures = (db: Db, changeRequestId: number) =>
  db.select().from(signatures).where(eq(signatures.changeRequestId, changeRequestId)).orderBy(signatures.id).execute();

export const listActiveSupervisors = (db: Db, siteId: number) =>
  db
    .select()
    .from(users)
    .where(and(eq(users.siteId, siteId), eq(users.role, 'supervisor'), eq(users.isActive, true)))
    .execute();

/** A recipe's approved changes in the order they were decided, with each plan's setpoint. */
export const listApprovedChanges = (db: Db, siteId: number, recipeId: number) =>
  db
    .select({ planId: changeRequests.planId, effectiveFrom: changeRequests.effectiveFrom, replaced: changeRequests.replaced, setpointC: plans.setpointC })
    .from(changeRequests)
    .innerJoin(plans, eq(changeRequests.planId, plans.id))
    .where(and(eq(changeRequests.siteId, siteId), eq(changeRequests.recipeId, recipeId), eq(changeRequests.status, 'approved')))
    .orderBy(asc(changeRequests.decidedAt), asc(changeRequests.id))
    .execute();

/** Every change request and signature of a site (the audit check compares each with its audited state). */
export const listAllSiteChangeRequests = (db: Db, siteId: number) =>
  db.select().from(changeRequests).where(eq(changeRequests.siteId, siteId)).orderBy(changeRequests.id).execute();
export const listSiteSignatures = (db: Db, siteId: number) =>
  db.select().from(signatures).where(eq(signatures.siteId, siteId)).orderBy(signatures.id).execute();
