import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import type { CalibrationResult } from '../../src/contracts/calibrations';
import { CALIBRATION_STATES } from '../../src/enums';
import { batches } from './batches';
import { lots } from './catalog';
import { createdAt, sites, users } from './core';
import { recipes } from './planning';

// A recipe and lot's calibration from its closed batches. Proposed when a batch closes (replacing the previous
// proposal), used by plans only once accepted; accepting supersedes the one in use. Rows are never deleted.
export const calibrations = sqliteTable(
  'calibrations',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    recipeId: integer('recipe_id')
      .notNull()
      .references(() => recipes.id),
    lotId: integer('lot_id')
      .notNull()
      .references(() => lots.id),
    state: text('state', { enum: CALIBRATION_STATES }).notNull(),
    batchIds: text('batch_ids', { mode: 'json' }).$type<number[]>().notNull(),
    result: text('result', { mode: 'json' }).$type<CalibrationResult>().notNull(),
    createdAt: text('created_at').notNull(),
    decidedBy: integer('decided_by').references(() => users.id),
    decidedAt: text('decided_at'),
  },
  (t) => [index('calibrations_recipe_lot_idx').on(t.siteId, t.recipeId, t.lotId, t.state)],
);

// The engineer's explicit choice to leave a closed batch out of calibration, with the reason; one row per batch.
export const calibrationExclusions = sqliteTable(
  'calibration_exclusions',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    batchId: integer('batch_id')
      .notNull()
      .references(() => batches.id),
    reason: text('reason').notNull(),
    excludedBy: integer('excluded_by')
      .notNull()
      .references(() => users.id),
    excludedAt: text('excluded_at').notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('calibration_exclusions_batch_unique').on(t.batchId)],
);

// The site's measurement spread for calibration; a site without a row uses MEASUREMENT_REL_SD (2 % of the product).
export const calibrationSettings = sqliteTable('calibration_settings', {
  siteId: integer('site_id')
    .primaryKey()
    .references(() => sites.id),
  measurementRelSd: real('measurement_rel_sd').notNull(),
  updatedAt: text('updated_at').notNull(),
});
