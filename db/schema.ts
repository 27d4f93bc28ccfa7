import { sql } from 'drizzle-orm';
import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { ROLES } from '../src/contracts/roles';
import { LOT_STATUSES } from '../src/contracts/lots';

// Times are ISO-8601 UTC strings: sortable, readable in a dump, and free of SQLite's local-time functions.
const createdAt = () => text('created_at').notNull().default(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`);

export const sites = sqliteTable('sites', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  name: text('name').notNull(),
  timeZone: text('time_zone').notNull().default('UTC'),
  createdAt: createdAt(),
});


export const users = sqliteTable(
  'users',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id').notNull().references(() => sites.id),
    email: text('email').notNull(),
    name: text('name').notNull(),
    role: text('role', { enum: ROLES }).notNull(),
    passwordHash: text('password_hash').notNull(),
    isActive: integer('is_active', { mode: 'boolean' }).notNull().default(true),
    cautionsAcknowledgedAt: text('cautions_acknowledged_at'),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('users_email_unique').on(t.email), index('users_site_idx').on(t.siteId)],
);

export const sessions = sqliteTable(
  'sessions',
  {
    id: text('id').primaryKey(),
    userId: integer('user_id').notNull().references(() => users.id),
    // The role at sign-in: a role change makes the session stale at once.
    role: text('role', { enum: ROLES }).notNull(),
    createdAt: text('created_at').notNull(),
    lastSeenAt: text('last_seen_at').notNull(),
    expiresAt: text('expires_at').notNull(),
    revokedAt: text('revoked_at'),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
);

export const vessels = sqliteTable(
  'vessels',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id').notNull().references(() => sites.id),
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
    siteId: integer('site_id').notNull().references(() => sites.id),
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
    siteId: integer('site_id').notNull().references(() => sites.id),
    enzymeId: integer('enzyme_id').notNull().references(() => enzymes.id),
    lotCode: text('lot_code').notNull(),
    receivedOn: text('received_on').notNull(),
    expiresOn: text('expires_on').notNull(),
    quantityKg: real('quantity_kg').notNull(),
    certActivity: real('cert_activity').notNull(),
    // The supplier's stability figure as stated, and the first-order kd at its temperature derived from it.
    certStability: text('cert_stability', { mode: 'json' }).notNull(),
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

export const auditEvents = sqliteTable(
  'audit_events',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id').references(() => sites.id),
    userId: integer('user_id').references(() => users.id),
    actor: text('actor').notNull(),
    action: text('action').notNull(),
    entity: text('entity').notNull(),
    entityId: text('entity_id'),
    oldValue: text('old_value', { mode: 'json' }),
    newValue: text('new_value', { mode: 'json' }),
    at: text('at').notNull(),
    prevHash: text('prev_hash').notNull(),
    hash: text('hash').notNull(),
  },
  (t) => [index('audit_site_idx').on(t.siteId, t.id)],
);
