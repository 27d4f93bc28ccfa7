import autocannon from 'autocannon';
import fs from 'node:fs';
import { DEMO_USERS } from '../../db/seed';
import { sessionCookie, startServer } from '../support/server';

// npm run load: loopback-only load against a freshly seeded server, bounded in time. Prints per mix and
// connection count: requests/s, latency p50 / p99 / max, errors, timeouts and non-2xx answers.
const DURATION_S = Number(process.env.LOAD_SECONDS ?? 10);

type Mix = { name: string; requests: autocannon.Request[]; cookie: string };

function run(url: string, mix: Mix, connections: number): Promise<autocannon.Result> {
  return new Promise((resolve, reject) => {
    autocannon(
      {
        url,
        connections,
        duration: DURATION_S,
        headers: { cookie: mix.cookie, 'x-yieldpoint-client': 'load', 'content-type': 'application/json' },
        requests: mix.requests,
      },
      (err, result) => (err ? reject(err) : resolve(result)),
    );
  });
}

const user = (role: string) => DEMO_USERS.find((u) => u.role === role)!;

async function main() {
  // The API alone: no web build needed.
  const server = await startServer({ env: { WEB_DIR: 'no-web-build' } });
  try {
    const engineer = await sessionCookie(server.baseURL, user('engineer').email, user('engineer').password);
    const mixes: Mix[] = [
      {
        name: 'reads',
        cookie: engineer,
        requests: ['/api/session', '/api/lots', '/api/vessels', '/api/enzymes', '/api/lots?status=accepted'].map((path) => ({ method: 'GET' as const, path })),
      },
    ];
    console.log(`Load on ${server.baseURL}, ${DURATION_S} s per run\n`);
    console.log('mix        conns   req/s    p50 ms  p99 ms  max ms  errors  timeouts  non-2xx');
    for (const mix of mixes) {
      for (const connections of [50, 200]) {
        const r = await run(server.baseURL, mix, connections);
        console.log(
          `${mix.name.padEnd(10)} ${String(connections).padStart(5)} ${r.requests.average.toFixed(0).padStart(7)} ${String(r.latency.p50).padStart(9)} ${String(r.latency.p99).padStart(7)} ${String(r.latency.max).padStart(7)} ${String(r.errors).padStart(7)} ${String(r.timeouts).padStart(9)} ${String(r.non2xx).padStart(8)}`,
        );
      }
    }
  } finally {
    await server.stop();
    fs.rmSync(server.dir, { recursive: true, force: true });
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
