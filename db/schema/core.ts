import { sql } from 'drizzle-orm';
import { index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { ROLES } from '../../src/enums';

// Times are ISO-8601 UTC strings: sortable, readable in a dump, and free of SQLite's local-time functions.
export const createdAt = () =>
  text('created_at')
    .notNull()
    .default(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`);

export const sites = sqliteTable('sites', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  name: text('name').notNull(),
  timeZone: text('time_zone').notNull().default('UTC'),
  /** ISO 4217 code every amount on the site is shown in (prices, costs, profit); the admin sets it. */
  currency: text('currency').notNull().default('EUR'),
  createdAt: createdAt(),
});

export const users = sqliteTable(
  'users',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
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
    userId: integer('user_id')
      .notNull()
      .references(() => users.id),
    // The role at sign-in: a role change makes the session stale at once.
    role: text('role', { enum: ROLES }).notNull(),
    createdAt: text('created_at').notNull(),
    lastSeenAt: text('last_seen_at').notNull(),
    expiresAt: text('expires_at').notNull(),
    revokedAt: text('revoked_at'),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
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
