// The tables the product's queries use, of the database this process runs on: PostgreSQL when DATABASE_URL is
// set, else SQLite. Both sets are one definition (db/schema/, from which db/pg/schema.ts is generated, proven
// identical by tests/db/pg-schema.test.ts); they are typed as the PostgreSQL ones, the dialect `Db` is typed in.
// A process runs on one database: db/client.ts refuses to open the other.
import * as pg from './pg/schema';
import * as sqlite from './schema';

export type DatabaseDialect = 'sqlite' | 'postgres';
export const databaseDialect: DatabaseDialect = process.env.DATABASE_URL ? 'postgres' : 'sqlite';

const tables = (databaseDialect === 'postgres' ? pg : sqlite) as unknown as typeof pg;

export const {
  assayPoints,
  assays,
  auditEvents,
  batchReadings,
  batchSettings,
  batches,
  billingEvents,
  calibrationExclusions,
  calibrationSettings,
  calibrations,
  certificateFiles,
  changeRequests,
  deviations,
  enzymes,
  invites,
  invoices,
  linkGaps,
  linkSettings,
  lots,
  mailOutbox,
  plans,
  recipes,
  sessions,
  signatures,
  sites,
  subscriptions,
  users,
  vesselSources,
  vessels,
} = tables;
