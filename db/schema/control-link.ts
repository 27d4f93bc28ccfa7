import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { SECURITY_MODES, SECURITY_POLICIES, SOURCE_UNITS } from '../../src/enums';
import { batches } from './batches';
import { vessels } from './catalog';
import { createdAt, sites, users } from './core';

// Where a vessel's temperature comes from in the control system (OPC UA, read-only). One per vessel.
export const vesselSources = sqliteTable(
  'vessel_sources',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    vesselId: integer('vessel_id')
      .notNull()
      .references(() => vessels.id),
    endpointUrl: text('endpoint_url').notNull(),
    nodeId: text('node_id').notNull(),
    unit: text('unit', { enum: SOURCE_UNITS }).notNull(),
    securityPolicy: text('security_policy', { enum: SECURITY_POLICIES }).notNull(),
    securityMode: text('security_mode', { enum: SECURITY_MODES }).notNull(),
    userName: text('user_name'),
    // The server asks for it in clear text inside the secure channel, so it is kept, never shown.
    password: text('password'),
    // Log in with Yieldpoint's user certificate (an X509 user token) instead of a user name.
    userCertificate: integer('user_certificate', { mode: 'boolean' }).notNull().default(false),
    isEnabled: integer('is_enabled', { mode: 'boolean' }).notNull().default(true),
    trustedThumbprint: text('trusted_thumbprint'),
    trustedAt: text('trusted_at'),
    trustedBy: integer('trusted_by').references(() => users.id),
    createdAt: createdAt(),
    updatedAt: text('updated_at').notNull(),
  },
  (t) => [uniqueIndex('vessel_sources_vessel_unique').on(t.vesselId), index('vessel_sources_site_idx').on(t.siteId)],
);

// The site's sampling of its tags; a site without a row uses DEFAULT_LINK_SETTINGS.
export const linkSettings = sqliteTable('link_settings', {
  siteId: integer('site_id')
    .primaryKey()
    .references(() => sites.id),
  samplingIntervalMs: integer('sampling_interval_ms').notNull(),
  deadbandC: real('deadband_c').notNull(),
  updatedAt: text('updated_at').notNull(),
});

// Spans of a batch the link could not fill from the server's history: the chart shows them as gaps.
export const linkGaps = sqliteTable(
  'link_gaps',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    batchId: integer('batch_id')
      .notNull()
      .references(() => batches.id),
    fromAt: text('from_at').notNull(),
    toAt: text('to_at').notNull(),
    reason: text('reason').notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('link_gaps_batch_idx').on(t.batchId, t.fromAt)],
);
