import { eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { migrateDb, openDb, sqliteClient } from '../../db/client';
import { batches, batchReadings } from '../../db/tables';
import { seedDemo } from '../../db/seed';

// The demo site as `npm start` seeds it: a live-looking shift on whatever day it is started.
describe('demo seed', () => {
  const seeded = async (now?: Date) => {
    const db = openDb(':memory:');
    await migrateDb(db);
    await seedDemo(db, { bcryptCost: 4, now });
    const running = await db.select().from(batches).where(eq(batches.state, 'running')).execute();
    const readings = running.length ? await db.select().from(batchReadings).where(eq(batchReadings.batchId, running[0]!.id)).execute() : [];
    sqliteClient(db).close();
    return { running, readings };
  };

  it('starts the running batch four hours before now, on the half hour, with readings up to now', async () => {
    const now = new Date('2027-03-14T16:47:12Z');
    const { running, readings } = await seeded(now);
    expect(running).toHaveLength(1);
    expect(running[0]!.startedAt).toBe('2027-03-14T12:30:00.000Z');
    const times = readings.map((r) => Date.parse(r.takenAt));
    expect(Math.min(...times)).toBe(Date.parse('2027-03-14T12:30:00.000Z'));
    expect(Math.max(...times)).toBeLessThanOrEqual(now.getTime());
    expect(now.getTime() - Math.max(...times)).toBeLessThan(30 * 60_000);
  });

  it("plans the demo's batches from their lot's assay fit where the lot has one, as the app's own batches do", async () => {
    const { running } = await seeded(new Date('2027-03-14T16:47:12Z'));
    // The running glucose batch's lot CGA-2605-11 has a demo QC assay; its program says so in words.
    expect(running[0]!.program.evidence!.source).toBe('fit');
    expect(running[0]!.program.evidence!.text).toMatch(/^assay fit of /);
  });

  it('keeps the fixed dates the tests rely on when no time is given', async () => {
    expect((await seeded()).running[0]!.startedAt).toBe('2026-12-01T05:00:00.000Z');
  });
});
