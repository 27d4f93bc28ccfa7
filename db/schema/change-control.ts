import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core';
import { sites, users } from './core';
import { plans, recipes } from './planning';
import type { SetpointSide } from '../../src/contracts/change-requests';
import { CHANGE_STATUSES, SIGNATURE_MEANINGS } from '../../src/enums';

// A proposal to release a saved plan as a recipe's setpoint. `recordHash` is fixed at submission; every
// signature must be made over the same hash, recomputed from the stored plan and request at signing.
export const changeRequests = sqliteTable(
  'change_requests',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    recipeId: integer('recipe_id')
      .notNull()
      .references(() => recipes.id),
    planId: integer('plan_id')
      .notNull()
      .references(() => plans.id),
    proposedBy: integer('proposed_by')
      .notNull()
      .references(() => users.id),
    rationale: text('rationale').notNull(),
    expectedEffect: text('expected_effect').notNull(),
    /** Site-local calendar date (YYYY-MM-DD) from which batches use the plan. */
    effectiveFrom: text('effective_from').notNull(),
    status: text('status', { enum: CHANGE_STATUSES }).notNull().default('proposed'),
    recordHash: text('record_hash').notNull(),
    createdAt: text('created_at').notNull(),
    decidedAt: text('decided_at'),
    // What the decision replaced, kept so a decided record still shows the comparison that was signed.
    replaced: text('replaced', { mode: 'json' }).$type<SetpointSide>(),
    /** The request that closed this one unsigned (superseded or stale). */
    supersededBy: integer('superseded_by'),
  },
  (t) => [index('change_requests_site_idx').on(t.siteId, t.status, t.id)],
);

// Insert only. The printed name and site time zone are copied at signing so the record reads the same
// after a user is renamed or the site moves its clock.
export const signatures = sqliteTable(
  'signatures',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    changeRequestId: integer('change_request_id')
      .notNull()
      .references(() => changeRequests.id),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id),
    printedName: text('printed_name').notNull(),
    role: text('role').notNull(),
    meaning: text('meaning', { enum: SIGNATURE_MEANINGS }).notNull(),
    comment: text('comment').notNull(),
    signedAt: text('signed_at').notNull(),
    siteTimeZone: text('site_time_zone').notNull(),
    recordHash: text('record_hash').notNull(),
  },
  (t) => [index('signatures_request_idx').on(t.changeRequestId, t.id)],
);
