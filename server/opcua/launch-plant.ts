import path from 'node:path';
import type { Db } from '../../db/client';
import type { ServerEnv } from '../env';
import { listSiteSources } from '../repositories/control-link';
import { firstSite } from '../repositories/sites';
import { DEMO_PLANT_USER, startDemoPlant } from './demo-plant';
import type { Plant } from './plant';

/**
 * Starts the simulated plant for `npm start` in the background when PLANT_SIM is auto; its PKI folder lies
 * beside the database. On 4840 when free, else on any free port. Never stops the app: a plant that cannot start
 * is reported and left out.
 */
export async function launchPlant(
  db: Db,
  env: Pick<ServerEnv, 'plantSim'>,
  dataDir: string,
): Promise<{ ready: Promise<Plant | null>; close(): Promise<void> }> {
  const site = await firstSite(db);
  // Beside the app unless the site reads a real plant: no source yet, or one reads this plant's address.
  const sources = site ? await listSiteSources(db, site.id) : [];
  const readsPlant = sources.some((r) => /^opc\.tcp:\/\/(127\.0\.0\.1|localhost):/.test(r.source.endpointUrl));
  if (!env.plantSim.enabled || !site || (sources.length && !readsPlant)) return { ready: Promise.resolve(null), close: async () => {} };
  const pkiFolder = path.join(dataDir, 'plant-sim-pki');
  const start = (port: number) => startDemoPlant(db, site.id, { port, pkiFolder });
  const ready = start(env.plantSim.port)
    .catch((err: unknown) => {
      if (env.plantSim.port === 0) throw err;
      return start(0);
    })
    .then(
      (plant) => {
        console.log(
          `Simulated plant (OPC UA): ${plant.endpointUrl}, user ${DEMO_PLANT_USER.userName} / ${DEMO_PLANT_USER.password}, tags ${plant.nodeIdOf('<vessel name>')}`,
        );
        return plant;
      },
      (err: unknown) => {
        console.error(`Simulated plant did not start: ${err instanceof Error ? err.message : String(err)}`);
        return null;
      },
    );
  return { ready, close: async () => void (await (await ready)?.close()) };
}
