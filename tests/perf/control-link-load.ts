import { returned } from '../../db/client';
import autocannon from 'autocannon';
import { fork } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { and, eq, sql } from 'drizzle-orm';
import { batchReadings, batches, vessels } from '../../db/tables';
import { certificateInfo, openAppPki } from '../../server/opcua/pki';
import { serverCertificate } from '../../server/opcua/reader';
import { upsertLinkSettings, upsertVesselSource } from '../../server/repositories/control-link';
import { startControlLink, type ControlLink } from '../../server/services/control-link';
import { startTestApp } from '../server/harness';

// The control-system link under load: TAGS tags on one local OPC UA server (SignAndEncrypt), each changing once a
// second and sampled at 1 s, for SECONDS; the app (same process, a SQLite file with synchronous=FULL) serves a
// light read mix meanwhile. Prints values written on the plant, stored, lost, the delay from the value's source
// timestamp to its commit (p50 / p99 / max), and the reads' latency.

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length ? s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))]! : NaN;
};

export async function controlLinkLoad(opts: { tags: number; seconds: number }): Promise<void> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-link-load-'));
  // The plant runs in its own process, as a real one does, so its work does not count against the app's.
  // LOAD_PLANT=sampled (default): the server measures a tag when it samples it; set: the plant sets the tags on its
  // own 1 s clock and the server samples the last value set (up to a second old by then).
  const mode = process.env.LOAD_PLANT === 'set' ? 'set' : 'sampled';
  const child = fork(
    path.join(__dirname, 'plant-process.ts'),
    [String(opts.tags), path.join(os.tmpdir(), 'yieldpoint-test-plant-pki'), 'reader', 'load-password-1', mode],
    {
      execArgv: ['--import', 'tsx'],
      stdio: ['ignore', 'ignore', 'inherit', 'ipc'],
    },
  );
  const ask = <T>(cmd?: string) =>
    new Promise<T>((resolve) => {
      child.once('message', (m) => resolve(m as T));
      if (cmd) child.send({ cmd });
    });
  const plant = await ask<{ endpointUrl: string; tags: string[]; nodeIds: string[] }>();
  const { tags } = plant;
  const pki = await openAppPki(path.join(dir, 'pki'));
  const delays: number[] = [];
  const ownDelays: number[] = [];
  let link: ControlLink | undefined;
  const app = await startTestApp(
    {},
    {
      file: path.join(dir, 'load.db'),
      now: new Date(),
      controlLink: (db, clock) =>
        (link = startControlLink({
          db,
          clock,
          pki,
          reconcileMs: 0,
          onStored: (src, received, stored) => (delays.push(stored - src), ownDelays.push(stored - received)),
        })),
    },
  );
  // The test clock stands still unless moved: follow the wall clock, as the server's does.
  app.clock.now = () => new Date();
  try {
    const { db } = app;
    const running = (await db.select().from(batches).where(eq(batches.state, 'running')).execute())[0]!;
    const cert = await serverCertificate({ endpointUrl: plant.endpointUrl, securityPolicy: 'Basic256Sha256', securityMode: 'SignAndEncrypt', pki });
    await pki.trust(cert);
    const now = new Date().toISOString();
    const startedAt = new Date(Date.now() - 60_000).toISOString();
    await upsertLinkSettings(db, { siteId: running.siteId, samplingIntervalMs: 1000, deadbandC: 0, updatedAt: now });
    const batchOf = new Map<string, number>();
    for (const tag of tags) {
      const v = await db
        .insert(vessels)
        .values({ siteId: running.siteId, name: tag, workingVolumeL: 1000, minC: 20, maxC: 75, maxHeatCPerH: 12, maxCoolCPerH: 8, hygienicMinC: 50 })
        .returning()
        .then(returned);
      const b = await db
        .insert(batches)
        .values({ ...running, id: undefined, vesselId: v.id, startedAt, createdAt: undefined })
        .returning()
        .then(returned);
      batchOf.set(tag, b.id);
      await upsertVesselSource(db, {
        siteId: running.siteId,
        vesselId: v.id,
        endpointUrl: plant.endpointUrl,
        nodeId: plant.nodeIds[tags.indexOf(tag)]!,
        unit: 'degC',
        securityPolicy: 'Basic256Sha256',
        securityMode: 'SignAndEncrypt',
        userName: 'reader',
        password: 'load-password-1',
        isEnabled: true,
        trustedThumbprint: certificateInfo(cert).thumbprint,
        trustedAt: now,
        trustedBy: null,
        updatedAt: now,
      });
    }
    const t0 = Date.now();
    await link!.reconcile();
    const linked = (await link!.status(running.siteId)).filter((s) => s.state === 'connected').length;
    console.log(
      `\nControl-system link: ${linked} of ${tags.length} tags subscribed in ${Date.now() - t0} ms; ${opts.seconds} s at 1 s sampling, plant mode ${mode}; ` +
        `machine load average ${os.loadavg()[0]!.toFixed(1)} on ${os.cpus().length} cores`,
    );
    const cpu0 = process.cpuUsage();
    // Under --cpu-prof: the window's bounds on the profile's clock (microseconds), to read the profile of the run alone.
    const mark = (what: string) =>
      process.execArgv.some((a) => a.startsWith('--cpu-prof')) && console.log(`profile mark ${what} ${process.hrtime.bigint() / 1000n}`);
    mark('start');
    const wall0 = performance.now();

    // Each tag changes once a second (at the plant's own clock), within the band of the 59 °C plan.
    child.send({ cmd: 'start' });
    const reads = await new Promise<autocannon.Result>((resolve, reject) => {
      void app.signIn('operator').then((c) =>
        autocannon(
          {
            url: app.base,
            connections: 4,
            overallRate: 40,
            duration: opts.seconds,
            headers: { cookie: c.cookie!, 'x-yieldpoint-client': 'load' },
            requests: [
              { method: 'GET', path: '/api/vessels' },
              { method: 'GET', path: `/api/batches/${running.id}` },
              { method: 'GET', path: '/api/control-link/status' },
            ],
          },
          (err, r) => (err ? reject(err) : resolve(r)),
        ),
      );
    });
    const { written } = await ask<{ written: number }>('stop');
    const cpu = process.cpuUsage(cpu0);
    mark('stop');
    const wallS = (performance.now() - wall0) / 1000;
    const ids = [...batchOf.values()];
    const count = () =>
      db
        .select({
          n: sql<number>`count(*)`.mapWith(Number),
          distinct: sql<number>`count(distinct ${batchReadings.batchId} || ' ' || ${batchReadings.takenAt})`,
        })
        .from(batchReadings)
        .where(and(eq(batchReadings.source, 'control_system'), sql`${batchReadings.batchId} in (${sql.join(ids, sql`, `)})`))
        .then((rows) => rows[0]!);
    // Let the last publish and commits land: until every value is stored, or nothing more arrives for 3 s.
    let stored = await count();
    for (let quiet = 0; stored.n < written && quiet < 6;) {
      await new Promise((r) => setTimeout(r, 500));
      const now2 = await count();
      quiet = now2.n === stored.n ? quiet + 1 : 0;
      stored = now2;
    }
    console.log(
      `written ${written}, stored ${stored.n} (distinct ${stored.distinct}), lost ${written - stored.n}; source time to stored p50 ${pct(delays, 50)} ms, p99 ${pct(delays, 99)} ms, max ${pct(delays, 100)} ms; arrival to stored p50 ${pct(ownDelays, 50)} ms, p99 ${pct(ownDelays, 99)} ms`,
    );
    console.log(
      `app process CPU meanwhile (link, ingest, requests and the load client): ${((cpu.user + cpu.system) / 1000 / wallS).toFixed(0)} ms per s; load average now ${os.loadavg()[0]!.toFixed(1)}`,
    );
    console.log(
      `other requests meanwhile: ${reads.requests.total} at ${reads.requests.average.toFixed(0)}/s, p50 ${reads.latency.p50} ms, p99 ${reads.latency.p99} ms, max ${reads.latency.max} ms, non-2xx ${reads.non2xx}`,
    );
  } finally {
    await link?.close();
    await app.close();
    child.send({ cmd: 'close' });
    await pki.dispose();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
