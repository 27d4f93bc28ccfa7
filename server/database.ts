import path from 'node:path';
import { migrateDb, openDb, type Db } from '../db/client';
import { migratePgDb, openPgDb } from '../db/pg/client';
import type { ServerEnv } from './env';

/** The configured database, migrated: PostgreSQL when DATABASE_URL is set, else the SQLite file. */
export async function openConfiguredDb(env: Pick<ServerEnv, 'databaseUrl' | 'databaseFile' | 'dataDir' | 'databasePool'>): Promise<Db> {
  if (env.databaseUrl) {
    const db = await openPgDb(env.databaseUrl, { dataDir: env.dataDir, max: env.databasePool });
    await migratePgDb(db);
    return db;
  }
  const db = openDb(env.databaseFile);
  await migrateDb(db);
  return db;
}

/** Where the database is, for a log line: the URL without its password, or the file. */
export const describeDb = (env: Pick<ServerEnv, 'databaseUrl' | 'databaseFile'>) =>
  env.databaseUrl ? env.databaseUrl.replace(/\/\/([^:/@]+):[^@]*@/, '//$1:***@') : path.resolve(env.databaseFile);
