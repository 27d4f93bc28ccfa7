import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import type { PlanInputs, PlanOutputs } from '../../src/contracts/plans';
import { enzymes, lots, vessels } from './catalog';
import { PLAN_STRATEGIES } from '../../src/enums';
import { createdAt, sites, users } from './core';

export const recipes = sqliteTable(
  'recipes',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    name: text('name').notNull(),
    enzymeId: integer('enzyme_id')
      .notNull()
      .references(() => enzymes.id),
    lotId: integer('lot_id')
      .notNull()
      .references(() => lots.id),
    vesselId: integer('vessel_id')
      .notNull()
      .references(() => vessels.id),
    s0GPerL: real('s0_g_per_l').notNull(),
    kmGPerL: real('km_g_per_l').notNull(),
    doseGPerL: real('dose_g_per_l').notNull(),
    vmaxRefGPerLH: real('vmax_ref_g_per_l_h').notNull(),
    // Until an assay fit gives the lot its own Ed, the recipe carries the one used to move kd between temperatures.
    edKJPerMol: real('ed_kj_per_mol').notNull(),
    batchH: real('batch_h').notNull(),
    turnaroundH: real('turnaround_h').notNull(),
    fillC: real('fill_c').notNull(),
    productPricePerKg: real('product_price_per_kg').notNull(),
    enzymePricePerKg: real('enzyme_price_per_kg').notNull(),
    heatingCostPerDegCHour: real('heating_cost_per_deg_c_hour').notNull(),
    currentSetpointC: real('current_setpoint_c').notNull(),
    // Written by change control when a plan is released for this recipe.
    releasedPlanId: integer('released_plan_id'),
    releasedAt: text('released_at'),
    createdAt: createdAt(),
    updatedAt: text('updated_at').notNull(),
  },
  (t) => [uniqueIndex('recipes_site_name_unique').on(t.siteId, t.name)],
);

// A plan is written once and never updated: change control signs its content hash.
export const plans = sqliteTable(
  'plans',
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
    createdBy: integer('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: text('created_at').notNull(),
    modelVersion: text('model_version').notNull(),
    inputs: text('inputs', { mode: 'json' }).$type<PlanInputs>().notNull(),
    outputs: text('outputs', { mode: 'json' }).$type<PlanOutputs>().notNull(),
    strategy: text('strategy', { enum: PLAN_STRATEGIES }).notNull(),
    setpointC: real('setpoint_c').notNull(),
    predictedProductGPerL: real('predicted_product_g_per_l').notNull(),
    p10GPerL: real('p10_g_per_l'),
    p50GPerL: real('p50_g_per_l'),
    p90GPerL: real('p90_g_per_l'),
    activityLeft: real('activity_left').notNull(),
    profitPerH: real('profit_per_h').notNull(),
    constraintsMet: integer('constraints_met', { mode: 'boolean' }).notNull(),
    contentHash: text('content_hash').notNull(),
  },
  (t) => [index('plans_site_recipe_idx').on(t.siteId, t.recipeId, t.id)],
);
