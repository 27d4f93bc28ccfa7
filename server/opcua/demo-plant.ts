import type { Db } from '../../db/client';
import { batchHours, plannedAt } from '../../src/batches';
import { vesselsWithRunningBatch } from '../repositories/vessels';
import { startPlant, type Plant } from './plant';

/** The demo plant's one reader account (loopback only, printed at start). */
export const DEMO_PLANT_USER = { userName: 'yieldpoint-reader', password: 'demo-plant-2026' };
// An idle vessel sits near room temperature.
const IDLE_C = 20;

/**
 * The simulated plant for `npm start`: one tag per vessel of the site, named after the vessel, following the
 * running batch's planned temperature (noise and an occasional excursion from the plant), else room temperature.
 */
export async function startDemoPlant(db: Db, siteId: number, opts: { port: number; pkiFolder: string }): Promise<Plant> {
  const rows = () => vesselsWithRunningBatch(db, siteId);
  let cache = { at: Date.now(), rows: await rows() };
  let reading = false;
  const setpointOf = (tag: string, at: Date) => {
    // Read the batches at most once per tick, not once per tag, in the background: a tag answers from the last read.
    if (at.getTime() - cache.at > 500 && !reading) {
      reading = true;
      void rows()
        .then((r) => (cache = { at: at.getTime(), rows: r }))
        .catch((err: unknown) => console.error(`[${new Date().toISOString()}] simulated plant: batches not read: ${(err as Error).message}`))
        .finally(() => (reading = false));
    }
    const r = cache.rows.find((x) => x.vessel.name === tag);
    return r?.program && r.startedAt ? plannedAt(r.program, Math.max(0, batchHours(r.startedAt, at.toISOString()))) : IDLE_C;
  };
  const plant = await startPlant({
    port: opts.port,
    pkiFolder: opts.pkiFolder,
    users: [DEMO_PLANT_USER],
    tags: cache.rows.map((r) => r.vessel.name),
    setpointOf,
  });
  // Vessels created later get their tag on the next tick.
  const adder = setInterval(() => cache.rows.forEach((r) => plant.addTag(r.vessel.name)), 5000);
  return { ...plant, close: () => (clearInterval(adder), plant.close()) };
}
