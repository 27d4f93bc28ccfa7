import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { freePort } from './server';

// Debian's postgresql-15 (`apt-get install -y postgresql-15`; .ci/run installs it when missing).
export const PG_BIN = process.env.PG_BIN ?? '/usr/lib/postgresql/15/bin';

export type TestPostgres = {
  /** Connection URL of the cluster's `postgres` database (superuser `yieldpoint`, trust on loopback). */
  url: string;
  /** A fresh empty database in the cluster, and its URL. */
  createDatabase(name: string): Promise<string>;
  /** Milliseconds initdb and the start took. */
  startMs: number;
  /** Stops the server at once (as a crash or a failover would), keeping its data; `up` starts it again. */
  down(): void;
  up(): void;
  stop(): Promise<void>;
};

// initdb refuses to run as root: as root, the cluster belongs to the `postgres` user Debian's package creates.
const asRoot = process.getuid?.() === 0;
function run(bin: string, args: string[]) {
  const [cmd, argv] = asRoot ? ['runuser', ['-u', 'postgres', '--', path.join(PG_BIN, bin), ...args]] : [path.join(PG_BIN, bin), args];
  const r = spawnSync(cmd, argv, { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${bin} ${args.join(' ')} failed (${r.status}):\n${r.stdout}${r.stderr}`);
}

/**
 * A throwaway PostgreSQL 15 cluster: initdb into a temporary folder, a free loopback port, its unix socket in the
 * same folder, removed by stop(). Durability is switched off (fsync, synchronous_commit, full_page_writes): these
 * clusters hold test data only, and the product's own settings are not under test here. `durable` keeps
 * PostgreSQL's defaults (the load figures); `settings` adds server settings (`name=value`).
 */
export async function startPostgres(opts: { durable?: boolean; settings?: string[] } = {}): Promise<TestPostgres> {
  if (!fs.existsSync(path.join(PG_BIN, 'initdb'))) throw new Error(`PostgreSQL 15 not found in ${PG_BIN}: apt-get install -y postgresql-15 (or set PG_BIN)`);
  const t0 = performance.now();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-pg-'));
  if (asRoot) execFileSync('chown', ['postgres:postgres', dir]);
  const data = path.join(dir, 'data');
  const port = await freePort();
  run('initdb', ['-D', data, '-U', 'yieldpoint', '-A', 'trust', '-E', 'UTF8', '--locale=C', '--no-sync', '--no-instructions']);
  const flags = `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c max_connections=200${opts.durable ? '' : ' -c fsync=off -c synchronous_commit=off -c full_page_writes=off'}${(opts.settings ?? []).map((s) => ` -c ${s}`).join('')}`;
  const up = () => run('pg_ctl', ['-D', data, '-o', flags, '-l', path.join(dir, 'log'), '-w', 'start']);
  up();
  const startMs = performance.now() - t0;
  const url = `postgres://yieldpoint@127.0.0.1:${port}/postgres`;
  return {
    url,
    startMs,
    async createDatabase(name) {
      const c = new pg.Client({ connectionString: url });
      await c.connect();
      try {
        await c.query(`create database "${name}"`);
      } finally {
        await c.end();
      }
      return `postgres://yieldpoint@127.0.0.1:${port}/${name}`;
    },
    down: () => run('pg_ctl', ['-D', data, '-m', 'immediate', '-w', 'stop']),
    up,
    async stop() {
      if (fs.existsSync(path.join(data, 'postmaster.pid'))) run('pg_ctl', ['-D', data, '-m', 'immediate', '-w', 'stop']);
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
