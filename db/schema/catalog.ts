import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import type { CertStability } from '../../src/contracts/lots';
import { LOT_STATUSES } from '../../src/enums';
import { createdAt, sites, users } from './core';

export const vessels = sqliteTable(
  'vessels',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    name: text('name').notNull(),
    workingVolumeL: real('working_volume_l').notNull(),
    minC: real('min_c').notNull(),
    maxC: real('max_c').notNull(),
    maxHeatCPerH: real('max_heat_c_per_h').notNull(),
    maxCoolCPerH: real('max_cool_c_per_h').notNull(),
    hygienicMinC: real('hygienic_min_c').notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('vessels_site_name_unique').on(t.siteId, t.name)],
);

export const enzymes = sqliteTable(
  'enzymes',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    name: text('name').notNull(),
    enzymeClass: text('enzyme_class').notNull(),
    ecNumber: text('ec_number').notNull(),
    supplier: text('supplier').notNull(),
    activityUnit: text('activity_unit').notNull(),
    unitDefinition: text('unit_definition').notNull(),
    tRefC: real('t_ref_c').notNull(),
    eaKJPerMol: real('ea_kj_per_mol').notNull(),
    specTempC: real('spec_temp_c').notNull(),
    specMinHalfLifeH: real('spec_min_half_life_h').notNull(),
    specMinActivity: real('spec_min_activity').notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('enzymes_site_name_unique').on(t.siteId, t.name)],
);

export const lots = sqliteTable(
  'lots',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    enzymeId: integer('enzyme_id')
      .notNull()
      .references(() => enzymes.id),
    lotCode: text('lot_code').notNull(),
    receivedOn: text('received_on').notNull(),
    expiresOn: text('expires_on').notNull(),
    quantityKg: real('quantity_kg').notNull(),
    certActivity: real('cert_activity').notNull(),
    // The supplier's stability figure as stated, and the first-order kd at its temperature derived from it.
    certStability: text('cert_stability', { mode: 'json' }).$type<CertStability>().notNull(),
    certKdPerH: real('cert_kd_per_h').notNull(),
    certTempC: real('cert_temp_c').notNull(),
    status: text('status', { enum: LOT_STATUSES }).notNull().default('quarantined'),
    decisionReason: text('decision_reason'),
    decidedBy: integer('decided_by').references(() => users.id),
    decidedAt: text('decided_at'),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('lots_enzyme_code_unique').on(t.enzymeId, t.lotCode), index('lots_site_idx').on(t.siteId)],
);
