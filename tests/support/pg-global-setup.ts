// Vitest global setup of the `server-pg` project: one throwaway PostgreSQL 15 cluster for the run, with a template
// database already migrated; each test app copies the template (CREATE DATABASE ... TEMPLATE, about 0.1 s).
import type { TestProject } from 'vitest/node';
import { migratePg, openPg } from '../../db/pg/client';
import { startPostgres } from './postgres';

declare module 'vitest' {
  export interface ProvidedContext {
    pgCluster: string;
  }
}

export const PG_TEMPLATE = 'yp_template';

export default async function setup(project: TestProject) {
  const pg = await startPostgres();
  const db = openPg(await pg.createDatabase(PG_TEMPLATE), { max: 1 });
  await migratePg(db);
  await db.$client.end();
  project.provide('pgCluster', pg.url);
  return () => pg.stop();
}
