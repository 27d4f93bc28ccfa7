import pg from 'pg';

let n = 0;

/** A fresh database of the run's PostgreSQL cluster, migrated (a copy of the template), and its URL. */
export async function freshPgDatabase(): Promise<string> {
  // Imported here: scripts outside vitest (npm run load) load the test harness too, and never call this.
  const { inject } = await import('vitest');
  const cluster = inject('pgCluster');
  const name = `yp_${process.pid}_${++n}_${Date.now().toString(36)}`;
  const c = new pg.Client({ connectionString: cluster });
  await c.connect();
  try {
    await c.query(`create database "${name}" template yp_template`);
  } finally {
    await c.end();
  }
  return cluster.replace(/\/[^/]*$/, `/${name}`);
}
