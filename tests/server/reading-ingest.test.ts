import { first } from '../../db/client';
import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditEvents, batchReadings, deviations, users } from '../../db/tables';
import { HttpError } from '../../server/http-error';
import { listAudit } from '../../server/repositories/audit';
import { verifyAudit } from '../../server/services/audit-verify';
import { loadSessionUser } from '../../server/services/auth';
import { readingIngest } from '../../server/services/readings';
import { email, startTestApp, type Client, type TestApp } from './harness';

// Group commit of logged readings (server/services/readings.ts readingIngest): readings that arrive together are
// stored in one transaction, yet each must behave exactly as if it had come alone.

let seq: TestApp; // readings logged one request at a time
let grouped: TestApp; // the same readings queued in one turn of the event loop, so stored in one transaction
let seqOp: Client;
beforeAll(async () => {
  [seq, grouped] = await Promise.all([startTestApp(), startTestApp()]);
  seqOp = await seq.signIn('operator');
});
afterAll(async () => {
  await Promise.all([seq.close(), grouped.close()]);
});

const count = async (t: TestApp, table: typeof batchReadings | typeof deviations | typeof auditEvents) =>
  (await t.db
    .select({ n: sql<number>`count(*)`.mapWith(Number) })
    .from(table)
    .then(first))!.n;
const sessionUser = async (t: TestApp, role: 'operator' | 'supervisor', site: 'main' | 'other' = 'main') =>
  (await loadSessionUser(
    t.db,
    (await t.db
      .select()
      .from(users)
      .where(eq(users.email, email(role, site)))
      .then(first))!.id,
  ))!;

async function runningBatch(c: Client): Promise<{ id: number; startedAt: string }> {
  const list = (await c.get('/api/batches')).body.batches as { id: number; state: string; startedAt: string }[];
  return list.find((b) => b.state === 'running')!;
}

const at = (startedAt: string, h: number) => new Date(Date.parse(startedAt) + h * 3_600_000).toISOString();

// The demo's running batch: planned 59 degC after the fill ramp, band +/-1.5 degC, vessel maximum 75 degC,
// stored readings every 30 min up to hour 4 (db/seed.ts). The arrival order below is deliberately not time order.
const READINGS: [h: number, c: number][] = [
  [3.0, 59.1], // in band
  [2.75, 62], // leaves the band after the in-band 2.5 h reading: band
  [2.8, 62.5], // still out: nothing new
  [2.9, 80], // above the vessel maximum: vessel_max
  [2.95, 59], // back in band
  [2.2, 55], // between stored in-band readings, out of band: band
  [2.25, 60], // in band
];

describe('readings that arrive together', () => {
  let batchId: number;
  let startedAt: string;
  let results: PromiseSettledResult<Awaited<ReturnType<ReturnType<typeof readingIngest>['log']>>>[];
  const keys = READINGS.map((_, i) => `group-reading-${i}-abcdef`);

  beforeAll(async () => {
    ({ id: batchId, startedAt } = await runningBatch(seqOp));
    expect(batchId).toBe((await runningBatch(await grouped.signIn('operator'))).id);
    for (const [i, [h, c]] of READINGS.entries()) {
      const r = await seqOp.post(`/api/batches/${batchId}/readings`, { key: keys[i], takenAt: at(startedAt, h), c });
      expect(r.status).toBe(201);
    }
    const ingest = readingIngest({ db: grouped.db, clock: grouped.clock });
    const op = await sessionUser(grouped, 'operator');
    const sup = await sessionUser(grouped, 'supervisor');
    const other = await sessionUser(grouped, 'operator', 'other');
    const logged = READINGS.map(([h, c], i) => ingest.log(i % 2 ? sup : op, batchId, { key: keys[i], takenAt: at(startedAt, h), c }));
    // Queued in the same turn as the good ones: a repeat, a reused key, a reading from the future, another site.
    const extra = [
      ingest.log(op, batchId, { key: keys[1], takenAt: at(startedAt, 2.75), c: 62 }),
      ingest.log(op, batchId, { key: keys[3], takenAt: at(startedAt, 2.9), c: 79 }),
      ingest.log(op, batchId, { key: 'group-reading-future-abcdef', takenAt: at(grouped.clock.now().toISOString(), 1), c: 59 }),
      ingest.log(other, batchId, { key: 'group-reading-other-abcdef', takenAt: at(startedAt, 2.6), c: 59 }),
    ];
    results = await Promise.allSettled([...logged, ...extra]);
  });

  it('stores each good reading once, with its own audit event in arrival order, and the chain still verifies', async () => {
    const good = results.slice(0, READINGS.length);
    expect(good.map((r) => r.status === 'fulfilled' && r.value.created)).toEqual(READINGS.map(() => true));
    const stored = await grouped.db.select().from(batchReadings).where(eq(batchReadings.batchId, batchId)).execute();
    expect(
      stored
        .filter((r) => r.clientKey.startsWith('group-reading-'))
        .map((r) => r.clientKey)
        .sort(),
    ).toEqual([...keys].sort());
    const events = (await listAudit(grouped.db, 1, { action: 'batch.reading' })).slice(-READINGS.length);
    expect(events.map((e) => (e.newValue as { key: string }).key)).toEqual(keys);
    expect(events.map((e) => e.actor)).toEqual(READINGS.map((_, i) => email(i % 2 ? 'supervisor' : 'operator')));
    expect(await verifyAudit(grouped.db, 1)).toMatchObject({ ok: true });
    expect(await count(grouped, batchReadings)).toBe(await count(seq, batchReadings));
  });

  it('refuses the bad ones alone, each as it would be refused on its own', async () => {
    const [repeat, reused, future, other] = results.slice(READINGS.length);
    const good1 = results[1];
    expect(repeat.status === 'fulfilled' && repeat.value.created).toBe(false);
    expect(repeat.status === 'fulfilled' && good1.status === 'fulfilled' && repeat.value.result).toEqual(good1.status === 'fulfilled' && good1.value.result);
    const refusal = (r: PromiseSettledResult<unknown>) =>
      r.status === 'rejected' && r.reason instanceof HttpError ? [r.reason.status, r.reason.code] : r.status;
    expect(refusal(reused)).toEqual([409, 'key_reused']);
    expect(refusal(future)).toEqual([400, 'invalid_input']);
    expect(refusal(other)).toEqual([404, 'not_found']);
    expect(await grouped.db.select().from(batchReadings).where(eq(batchReadings.clientKey, 'group-reading-future-abcdef')).execute()).toEqual([]);
  });

  it('raises the same deviations, for the same readings, as the readings logged one by one', async () => {
    const shape = async (t: TestApp) =>
      (
        await t.db
          .select({
            kind: deviations.kind,
            at: deviations.at,
            valueC: deviations.valueC,
            expectedC: deviations.expectedC,
            message: deviations.message,
            key: batchReadings.clientKey,
            corrective: deviations.corrective,
          })
          .from(deviations)
          .leftJoin(batchReadings, eq(deviations.readingId, batchReadings.id))
          .where(eq(deviations.batchId, batchId))
          .orderBy(deviations.id)
          .execute()
      )
        // The corrective setpoint comes from the batch status after the whole group, as for a historian import.
        .map(({ corrective, ...d }) => ({ ...d, hasCorrective: corrective !== null }));
    const expected = await shape(seq);
    expect(expected.map((d) => [d.kind, d.key])).toEqual([
      ['band', keys[1]],
      ['vessel_max', keys[3]],
      ['band', keys[5]],
    ]);
    expect(await shape(grouped)).toEqual(expected);
  });

  it('answers each reading with the deviations it raised, as a later repeat of it is answered', async () => {
    const c = await grouped.signIn('operator');
    for (const i of [1, 3, 5]) {
      const first = results[i];
      if (first.status !== 'fulfilled') throw new Error(`reading ${i} was refused`);
      expect(first.value.result.deviations).toHaveLength(1);
      const [h, temp] = READINGS[i];
      const again = await c.post(`/api/batches/${batchId}/readings`, { key: keys[i], takenAt: at(startedAt, h), c: temp });
      expect(again.status).toBe(200);
      expect(again.body).toEqual(first.value.result);
    }
  });
});

describe('concurrent reading requests', () => {
  it('answers 50 at once with 201 each, stores all 50 with their audit events, and keeps the chain intact', async () => {
    const op = await seq.signIn('operator');
    const { id, startedAt } = await runningBatch(op);
    const readings0 = await count(seq, batchReadings);
    const audit0 = await count(seq, auditEvents);
    const replies = await Promise.all(
      Array.from({ length: 50 }, (_, i) =>
        op.post(`/api/batches/${id}/readings`, { key: `concurrent-${i}-abcdef`, takenAt: at(startedAt, 3 + i / 1000), c: 59 }),
      ),
    );
    expect(replies.map((r) => r.status)).toEqual(replies.map(() => 201));
    expect(new Set(replies.map((r) => r.body.reading.id)).size).toBe(50);
    expect(await count(seq, batchReadings)).toBe(readings0 + 50);
    const raised = replies.reduce((n, r) => n + r.body.deviations.length, 0);
    expect(await count(seq, auditEvents)).toBe(audit0 + 50 + raised);
    expect(await verifyAudit(seq.db, 1)).toMatchObject({ ok: true });
  });
});
