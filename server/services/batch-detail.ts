// The batch record as the batch page shows it: batch, readings (a sample of a long record), deviations, status,
// settings and the plan's signatures.
import { CORRECTABLE, sampleIndices } from '../../src/batches';
import { type BatchDetail } from '../../src/contracts/batches';
import type { SessionUser } from '../../src/contracts/session';
import { batchRecordOf, statusNow } from './batch-record';
import { batchesLoggedBy, listDeviations, listReadings, planSignatures, readingsByIds } from '../repositories/batches';
import type { Services } from '../context';
import { batchSettingsOf, loadBatch, toBatch } from './batches';
import { toDeviation } from './deviations';
import { toReading } from './readings';

// A phone needs neither megabytes of historian data nor 50,000 table rows: past this many it gets a sample.
const DETAIL_READINGS = 5000;
const LATEST_KEPT = 50;

export async function getBatchDetail(s: Services, u: SessionUser, id: number): Promise<BatchDetail> {
  const record = await batchRecordOf(s.db, (await loadBatch(s.db, u.siteId, id)).batch);
  const chosen = sampleIndices(
    record.points.map((p) => p.c),
    DETAIL_READINGS,
    LATEST_KEPT,
  );
  return {
    ...(await batchRecord(s, u, id, chosen.length === record.ids.length ? 'all' : chosen.map((i) => record.ids[i]!))),
    readingsTotal: record.ids.length,
  };
}

/** The batch record with every reading (the report) or the chosen ones (the batch page of a long record). */
export async function batchRecord(
  { db, clock }: Services,
  u: SessionUser,
  id: number,
  which: 'all' | readonly number[] = 'all',
): Promise<Omit<BatchDetail, 'readingsTotal'>> {
  const j = await loadBatch(db, u.siteId, id);
  const b = j.batch;
  const readings = (await (which === 'all' ? listReadings(db, b.id) : readingsByIds(db, which))).map((r) => toReading(r.reading, r.enteredBy, b.startedAt));
  const devs = (await listDeviations(db, b.id)).map(toDeviation);
  const now = clock.now().toISOString();
  const needsCorrective = b.state === 'running' && devs.some((d) => d.state !== 'closed' && CORRECTABLE.has(d.kind));
  const status = await statusNow(db, b, now, needsCorrective);
  const isMine = b.startedBy === u.id || (await batchesLoggedBy(db, u.id, [b.id])).length > 0;
  const signed = b.planId
    ? (await planSignatures(db, u.siteId, b.planId)).map(({ signature: sg, changeRequestId }) => ({
        changeRequestId,
        printedName: sg.printedName,
        role: sg.role,
        meaning: sg.meaning,
        comment: sg.comment,
        signedAt: sg.signedAt,
        recordHash: sg.recordHash,
      }))
    : [];
  return { batch: toBatch(j, isMine), readings, deviations: devs, status, settings: await batchSettingsOf(db, u.siteId), signatures: signed, now };
}
