import autocannon from 'autocannon';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { DEMO_USERS } from '../../db/seed';
import { MAX_IMPORT_ROWS } from '../../src/contracts/batches';
import { startPostgres } from '../support/postgres';
import { sessionCookie, startServer, type RunningServer } from '../support/server';
import { controlLinkLoad } from './control-link-load';

// npm run load: loopback-only load against a freshly seeded server, bounded in time. Prints per mix and
// connection count: requests/s, latency p50 / p99 / max, errors, timeouts and non-2xx answers.
// Then the import mix: other users' reads (20 connections) while the largest allowed historian import
// (300,000 rows) runs, and afterwards the time to read the big batch's list, page and report.
// LOAD_MIX=reads|ingest|import|opcua runs one mix; LOAD_CPU_PROF=dir writes the server's CPU profile there when it stops.
// opcua: the control-system link, LOAD_TAGS tags (200) at 1 s sampling for LOAD_LINK_SECONDS (60), in this process.
// LOAD_DB=postgres: the reads and ingest mixes on a throwaway PostgreSQL 15 (durable: fsync on, as SQLite's
// synchronous=FULL), with LOAD_PROCESSES server processes (1 or 2) on the one database, the connections split
// evenly between them as a proxy would; a row then sums the requests/s and gives the worse process's latencies.
// LOAD_PG_STATS=1 also prints, after each run, the statements PostgreSQL spent most time on (pg_stat_statements);
// LOAD_PG_SETTINGS='name=value ...' adds server settings (say, auto_explain's, with a log_directory that outlives the run).
const DURATION_S = Number(process.env.LOAD_SECONDS ?? 10);
const ONLY_MIX = process.env.LOAD_MIX;
const CPU_PROF_DIR = process.env.LOAD_CPU_PROF;
const ON_PG = process.env.LOAD_DB === 'postgres';
const PROCESSES = Number(process.env.LOAD_PROCESSES ?? 1);
const PG_STATS = process.env.LOAD_PG_STATS === '1';

type Mix = { name: string; requests: autocannon.Request[]; cookie: string; count?: () => Promise<number> };

/** Runs the mix for DURATION_S, or from now until `until` settles. */
function run(url: string, mix: Mix, connections: number, until?: Promise<unknown>): Promise<autocannon.Result> {
  return new Promise((resolve, reject) => {
    const instance = autocannon(
      {
        url,
        connections,
        duration: until ? 3600 : DURATION_S,
        headers: { cookie: mix.cookie, 'x-yieldpoint-client': 'load', 'content-type': 'application/json' },
        requests: mix.requests,
      },
      (err, result) => (err ? reject(err) : resolve(result)),
    );
    void until?.finally(() => instance.stop());
  });
}

const user = (role: string) => DEMO_USERS.find((u) => u.role === role)!;

/** The mix on every server at once, `connections` split evenly; one summary (rates summed, latencies the worst). */
async function runAll(urls: string[], mix: Mix, connections: number) {
  const rs = await Promise.all(urls.map((u) => run(u, mix, Math.ceil(connections / urls.length))));
  const sum = (f: (r: autocannon.Result) => number) => rs.reduce((a, r) => a + f(r), 0);
  const worst = (f: (r: autocannon.Result) => number) => Math.max(...rs.map(f));
  return {
    rps: sum((r) => r.requests.average),
    p50: worst((r) => r.latency.p50),
    p99: worst((r) => r.latency.p99),
    max: worst((r) => r.latency.max),
    errors: sum((r) => r.errors),
    timeouts: sum((r) => r.timeouts),
    non2xx: sum((r) => r.non2xx),
    ok: sum((r) => r['2xx']),
  };
}

async function main() {
  if (ON_PG) return pgLoad();
  if (ONLY_MIX !== 'opcua') await httpLoad();
  if (!ONLY_MIX || ONLY_MIX === 'opcua')
    await controlLinkLoad({ tags: Number(process.env.LOAD_TAGS ?? 200), seconds: Number(process.env.LOAD_LINK_SECONDS ?? 60) });
}

async function httpLoad() {
  // The API alone: no web build needed.
  const turnsFile = path.join(os.tmpdir(), `yieldpoint-turns-${process.pid}.txt`);
  const server = await startServer({
    env: { WEB_DIR: 'no-web-build', LOAD_TURNS_FILE: turnsFile },
    nodeArgs: [...(CPU_PROF_DIR ? ['--cpu-prof', `--cpu-prof-dir=${CPU_PROF_DIR}`] : []), '--import', path.join(__dirname, 'long-turns.mjs')],
  });
  try {
    const { mixes, operator, running } = await httpMixes(server.baseURL);
    console.log(
      `Load on ${server.baseURL}, ${DURATION_S} s per run; machine load average ${os.loadavg()[0]!.toFixed(1)} on ${os.cpus().length} cores (figures from a busy machine are not the product's)\n`,
    );
    await printMixes([server.baseURL], mixes);
    if (!ONLY_MIX || ONLY_MIX === 'import') await importMix(server.baseURL, mixes[0]!, operator, running, turnsFile);
  } finally {
    fs.rmSync(turnsFile, { force: true });
    await server.stop();
    fs.rmSync(server.dir, { recursive: true, force: true });
  }
}

/** The reads and ingest mixes against a seeded server. */
async function httpMixes(baseURL: string) {
  {
    const server = { baseURL };
    const engineer = await sessionCookie(server.baseURL, user('engineer').email, user('engineer').password);
    const operator = await sessionCookie(server.baseURL, user('operator').email, user('operator').password);
    const headers = { cookie: operator, 'x-yieldpoint-client': 'load' };
    const batches = (await (await fetch(`${server.baseURL}/api/batches`, { headers })).json()) as {
      batches: { id: number; state: string; startedAt: string }[];
    };
    const running = batches.batches.find((b) => b.state === 'running');
    if (!running) throw new Error('the demo site has no running batch');
    const storedReadings = async () =>
      ((await (await fetch(`${server.baseURL}/api/batches/${running.id}`, { headers })).json()) as { readingsTotal: number }).readingsTotal;
    // Each request a new reading with its own idempotency key, between the batch start and now.
    let k = 0;
    const span = Date.now() - Date.parse(running.startedAt);
    const mixes: Mix[] = [
      {
        name: 'reads',
        cookie: engineer,
        requests: ['/api/session', '/api/lots', '/api/vessels', '/api/enzymes', '/api/lots?status=accepted'].map((path) => ({ method: 'GET' as const, path })),
      },
      {
        name: 'ingest',
        cookie: operator,
        count: storedReadings,
        requests: [
          {
            method: 'POST',
            path: `/api/batches/${running.id}/readings`,
            setupRequest: (req: autocannon.Request) => {
              k++;
              const takenAt = new Date(Date.parse(running.startedAt) + ((k * 7919) % span)).toISOString();
              return { ...req, body: JSON.stringify({ key: `load-${process.pid}-${k}`, takenAt, c: 50 + (k % 7) / 10 }) };
            },
          },
        ],
      },
    ];
    return { mixes, operator, running };
  }
}

async function printMixes(urls: string[], mixes: Mix[], afterRun?: () => Promise<void>) {
  console.log('mix        conns   req/s    p50 ms  p99 ms  max ms  errors  timeouts  non-2xx');
  for (const mix of mixes.filter((m) => !ONLY_MIX || m.name === ONLY_MIX)) {
    for (const connections of [50, 200]) {
      const before = mix.count ? await mix.count() : 0;
      const r = await runAll(urls, mix, connections);
      const after = mix.count ? await mix.count() : 0;
      console.log(
        `${mix.name.padEnd(10)} ${String(connections).padStart(5)} ${r.rps.toFixed(0).padStart(7)} ${String(r.p50).padStart(9)} ${String(r.p99).padStart(7)} ${String(r.max).padStart(7)} ${String(r.errors).padStart(7)} ${String(r.timeouts).padStart(9)} ${String(r.non2xx).padStart(8)}${mix.count ? `  stored ${after - before}, acknowledged ${r.ok}: ${after - before >= r.ok ? 'none lost (requests still in flight at the end are stored too)' : `${r.ok - (after - before)} LOST`}` : ''}`,
      );
      await afterRun?.();
    }
  }
}

/** LOAD_DB=postgres: the reads, ingest and import mixes on PostgreSQL with LOAD_PROCESSES server processes. */
async function pgLoad() {
  const settings = [
    ...(PG_STATS ? ['shared_preload_libraries=pg_stat_statements'] : []),
    ...(process.env.LOAD_PG_SETTINGS?.split(/\s+/).filter(Boolean) ?? []),
  ];
  const cluster = await startPostgres({ durable: true, settings });
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-pg-load-'));
  const turnsFile = path.join(os.tmpdir(), `yieldpoint-turns-${process.pid}.txt`);
  const servers: RunningServer[] = [];
  try {
    const url = await cluster.createDatabase('load');
    const env = { DATABASE_URL: url, DATA_DIR: dataDir, WEB_DIR: 'no-web-build', DATABASE_POOL: '10', LOAD_TURNS_FILE: turnsFile };
    // One after the other: the first migrates and seeds, the next find it done.
    const nodeArgs = [...(CPU_PROF_DIR ? ['--cpu-prof', `--cpu-prof-dir=${CPU_PROF_DIR}`] : []), '--import', path.join(__dirname, 'long-turns.mjs')];
    for (let i = 0; i < PROCESSES; i++) servers.push(await startServer({ env, nodeArgs }));
    const urls = servers.map((s) => s.baseURL);
    const { mixes, operator, running } = await httpMixes(urls[0]!);
    console.log(
      `Load on PostgreSQL 15 (${PROCESSES} server process${PROCESSES > 1 ? 'es' : ''}: ${urls.join(', ')}), ${DURATION_S} s per run; machine load average ${os.loadavg()[0]!.toFixed(1)} on ${os.cpus().length} cores\n`,
    );
    const stats = PG_STATS ? new pg.Client({ connectionString: url }) : null;
    await stats?.connect();
    await stats?.query('create extension pg_stat_statements');
    await stats?.query('select pg_stat_statements_reset()');
    await printMixes(urls, mixes, stats ? () => topStatements(stats) : undefined);
    // The import against the first process (its long turns are recorded; with two, the other serves no reads).
    if (!ONLY_MIX || ONLY_MIX === 'import') {
      await importMix(urls[0]!, mixes[0]!, operator, running, turnsFile);
      if (stats) await topStatements(stats);
    }
    await stats?.end();
  } finally {
    fs.rmSync(turnsFile, { force: true });
    for (const s of servers) await s.stop();
    await cluster.stop();
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

/** The statements PostgreSQL spent most time on since the last call (then reset). */
async function topStatements(c: pg.Client) {
  const { rows } = await c.query<{ calls: string; total: number; mean: number; query: string }>(
    'select calls, total_exec_time as total, mean_exec_time as mean, query from pg_stat_statements order by total_exec_time desc limit 12',
  );
  for (const r of rows)
    console.log(
      `    ${r.total.toFixed(0).padStart(7)} ms ${r.calls.padStart(8)} calls ${r.mean.toFixed(3).padStart(8)} ms  ${r.query.replace(/\s+/g, ' ').slice(0, 110)}`,
    );
  await c.query('select pg_stat_statements_reset()');
}

async function timed(url: string, cookie: string): Promise<number> {
  const t0 = performance.now();
  const r = await fetch(url, { headers: { cookie, 'x-yieldpoint-client': 'load' } });
  await r.arrayBuffer();
  if (!r.ok) throw new Error(`${url}: ${r.status}`);
  return performance.now() - t0;
}

/** The server's turns longer than 20 ms between two instants (from tests/perf/long-turns.mjs). */
function longTurns(file: string, fromMs: number, toMs: number): string {
  const held = (fs.existsSync(file) ? fs.readFileSync(file, 'utf8') : '')
    .split('\n')
    .filter(Boolean)
    .map((l) => l.split(' ').map(Number) as [number, number])
    .filter(([at]) => at >= fromMs && at <= toMs)
    .map(([, ms]) => ms)
    .sort((a, b) => b - a);
  return `${held.length} turns over 20 ms (${held.filter((ms) => ms > 50).length} over 50 ms), longest ${
    held
      .slice(0, 5)
      .map((ms) => ms.toFixed(0))
      .join(', ') || '-'
  } ms`;
}

async function importMix(baseURL: string, reads: Mix, operator: string, running: { id: number; startedAt: string }, turnsFile: string) {
  // The same reads alone first, on the same machine a moment before: the figure the import's is compared with
  // (after a warm-up: the server's first seconds include its own start, the simulated plant's certificates).
  await run(baseURL, reads, 20);
  const aloneFrom = Date.now();
  const alone = await run(baseURL, reads, 20);
  console.log(
    `\nreads alone (20 conns, ${DURATION_S} s): ${alone.requests.average.toFixed(0)} req/s, p50 ${alone.latency.p50} ms, p99 ${alone.latency.p99} ms, max ${alone.latency.max} ms; ` +
      `server: ${longTurns(turnsFile, aloneFrom, Date.now())}; load average ${os.loadavg()[0]!.toFixed(1)}`,
  );
  // Invented readings 40 ms apart from the batch start: 300,000 rows span 3.3 h, inside the running batch.
  const start = Date.parse(running.startedAt);
  const rows = MAX_IMPORT_ROWS;
  let csv = 'time,degC\n';
  for (let i = 0; i < rows; i++) csv += `${new Date(start + 40 * i).toISOString()},${(55 + (i % 40) / 10).toFixed(1)}\n`;
  const t0 = performance.now();
  const importFrom = Date.now();
  let importMs = 0;
  const upload = fetch(`${baseURL}/api/batches/${running.id}/readings/import`, {
    method: 'POST',
    headers: { cookie: operator, 'x-yieldpoint-client': 'load', 'content-type': 'text/csv' },
    body: csv,
  }).then(async (r) => {
    importMs = performance.now() - t0;
    const body = (await r.json()) as { imported?: number; message?: string };
    if (!r.ok) throw new Error(`import refused: ${r.status} ${body.message}`);
    return body.imported ?? 0;
  });
  // The reads run as long as the import does, its storing included.
  const r = await run(
    baseURL,
    reads,
    20,
    upload.catch(() => 0),
  );
  const imported = await upload;
  console.log(
    `\nimport mix: ${rows.toLocaleString('en')} rows (${(csv.length / 1e6).toFixed(1)} MB) imported ${imported.toLocaleString('en')} in ${(importMs / 1000).toFixed(1)} s; ` +
      `other reads meanwhile (20 conns, the whole import): ${r.requests.average.toFixed(0)} req/s, p50 ${r.latency.p50} ms, p99 ${r.latency.p99} ms, max ${r.latency.max} ms, non-2xx ${r.non2xx}; ` +
      `server: ${longTurns(turnsFile, importFrom, Date.now())}; load average ${os.loadavg()[0]!.toFixed(1)}`,
  );
  for (const [name, path] of [
    ['batch list', '/api/batches'],
    ['batch page', `/api/batches/${running.id}`],
    ['report CSV', `/api/batches/${running.id}/report.csv`],
  ] as const) {
    const ms: number[] = [];
    for (let i = 0; i < 5; i++) ms.push(await timed(baseURL + path, operator));
    ms.sort((a, b) => a - b);
    console.log(`after the import, ${name}: median ${ms[2]!.toFixed(0)} ms (5 requests, max ${ms[4]!.toFixed(0)} ms)`);
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
