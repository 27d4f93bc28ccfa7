import net from 'node:net';
import {
  DataType,
  DataValue,
  MessageSecurityMode,
  OPCUACertificateManager,
  OPCUAServer,
  SecurityPolicy,
  StatusCodes,
  type StatusCode,
  type UAVariable,
} from 'node-opcua';

/**
 * A small simulated plant for the demo and the tests: an OPC UA server on 127.0.0.1 with one temperature
 * variable (degC, Double, historized) per vessel. With `setpointOf` it ticks by itself: the value follows the
 * setpoint with measurement noise and, now and then, an excursion of a few degrees for some minutes; without it
 * the tests set every value themselves. It trusts any client certificate (a demo plant; a real server is
 * configured by its owner) unless `trustClients: 'listed'`, and wants a user name and password (or, with
 * `userCertificates`, a user certificate it trusts).
 */
export type PlantOptions = {
  /** 0 or omitted: a free port. */
  port?: number;
  /** Folder of the plant's own PKI (its certificate and the client certificates it has seen). */
  pkiFolder: string;
  users: { userName: string; password: string }[];
  tags: string[];
  /** Setpoint of a tag at a time, degC; omitted: no ticking, values come from `set`. */
  setpointOf?: (tag: string, at: Date) => number;
  tickMs?: number;
  /** Chance per tick that an excursion starts on a tag; default one every two hours at 1 s ticks. */
  excursionChance?: number;
  random?: () => number;
  /** false: the tags keep no history (HistoryRead is refused), as some servers do. */
  history?: boolean;
  /**
   * A transmitter the server reads when it samples a tag (as a server polling its field devices does): the value
   * measured at that instant, its source time the sample's time; null: no new measurement, the tag keeps its value.
   * Without it a tag changes only by `set` or the ticking, and the server samples the value last set.
   */
  measure?: (tag: string, at: Date) => number | null;
  /** 'listed': only client application certificates passed to `trustClient` are accepted (default: any). */
  trustClients?: 'any' | 'listed';
  /** Folder of the plant's trust list of user certificates (X509 user login), trusted with `trustUser`; omitted: none. */
  userCertificates?: string;
};

export type Plant = {
  endpointUrl: string;
  port: number;
  nodeIdOf(tag: string): string;
  /** Sets a tag's value (degC) with its status and source time; kept in the tag's history. */
  set(tag: string, c: number, opts?: { status?: StatusCode; at?: Date }): void;
  addTag(tag: string): void;
  /** Trusts a client application certificate (DER), as a plant's admin does. */
  trustClient(der: Buffer): Promise<void>;
  /** Trusts a user certificate (DER) for X509 user login. */
  trustUser(der: Buffer): Promise<void>;
  close(): Promise<void>;
};

export const PLANT_NAMESPACE = 'urn:yieldpoint:simulated-plant';
const NOISE_SD_C = 0.08;
const EXCURSION_C = 2.5;
const EXCURSION_MS = 6 * 60_000;

/** A port nothing listens on just now (127.0.0.1). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
  });
}

/** The node id the plant gives a tag: a string id in the plant's own namespace. */
export const plantNodeId = (tag: string) => `ns=1;s=Reactors.${tag}.Temperature`;

export async function startPlant(o: PlantOptions): Promise<Plant> {
  const port = o.port || (await freePort());
  const random = o.random ?? Math.random;
  const serverCertificateManager = new OPCUACertificateManager({ rootFolder: o.pkiFolder, automaticallyAcceptUnknownCertificate: o.trustClients !== 'listed' });
  await serverCertificateManager.initialize();
  const userCertificateManager = o.userCertificates
    ? new OPCUACertificateManager({ rootFolder: o.userCertificates, automaticallyAcceptUnknownCertificate: false })
    : null;
  await userCertificateManager?.initialize();
  const server = new OPCUAServer({
    port,
    hostname: '127.0.0.1',
    alternateHostname: ['127.0.0.1'],
    serverCertificateManager,
    ...(userCertificateManager ? { userCertificateManager } : {}),
    allowAnonymous: false,
    securityPolicies: [SecurityPolicy.None, SecurityPolicy.Basic256Sha256],
    securityModes: [MessageSecurityMode.None, MessageSecurityMode.Sign, MessageSecurityMode.SignAndEncrypt],
    userManager: { isValidUser: (userName: string, password: string) => o.users.some((u) => u.userName === userName && u.password === password) },
    buildInfo: { productName: 'Yieldpoint simulated plant', manufacturerName: 'Yieldpoint demo' },
    serverInfo: { applicationUri: PLANT_NAMESPACE, applicationName: { text: 'Yieldpoint simulated plant' } },
  });
  await server.initialize();
  const addressSpace = server.engine.addressSpace!;
  const ns = addressSpace.getOwnNamespace();
  const folder = ns.addFolder(addressSpace.rootFolder.objects, { browseName: 'Reactors' });
  const nodes = new Map<string, UAVariable>();
  const excursions = new Map<string, { from: number; sign: number }>();

  const set: Plant['set'] = (tag, c, opts = {}) => {
    const node = nodes.get(tag);
    if (!node) throw new Error(`no tag ${tag}`);
    node.setValueFromSource({ dataType: DataType.Double, value: c }, opts.status ?? StatusCodes.Good, opts.at ?? new Date());
  };
  const addTag = (tag: string) => {
    if (nodes.has(tag)) return;
    const node = ns.addVariable({
      organizedBy: folder,
      browseName: `${tag}.Temperature`,
      nodeId: `s=Reactors.${tag}.Temperature`,
      dataType: 'Double',
      minimumSamplingInterval: 100,
      description: `Reactor temperature of ${tag}, degC`,
    });
    if (o.measure) {
      const measure = o.measure;
      node.bindVariable(
        {
          refreshFunc: (done) => {
            const at = new Date();
            const c = measure(tag, at);
            done(
              null,
              c === null
                ? node.readValue()
                : new DataValue({ value: { dataType: DataType.Double, value: c }, statusCode: StatusCodes.Good, sourceTimestamp: at, serverTimestamp: at }),
            );
          },
        },
        true,
      );
    }
    if (o.history !== false) addressSpace.installHistoricalDataNode(node, { maxOnlineValues: 200_000 });
    nodes.set(tag, node);
  };
  for (const t of o.tags) addTag(t);
  await server.start();

  // Box-Muller: standard normal from two uniform draws.
  const normal = () => Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random());
  let timer: ReturnType<typeof setInterval> | null = null;
  if (o.setpointOf) {
    const setpointOf = o.setpointOf;
    const tickMs = o.tickMs ?? 1000;
    const chance = o.excursionChance ?? tickMs / (2 * 3_600_000);
    const tick = () => {
      const now = new Date();
      for (const tag of nodes.keys()) {
        let ex = excursions.get(tag);
        if (!ex && random() < chance) excursions.set(tag, (ex = { from: now.getTime(), sign: random() < 0.5 ? -1 : 1 }));
        let bump = 0;
        if (ex) {
          const f = (now.getTime() - ex.from) / EXCURSION_MS;
          if (f >= 1) excursions.delete(tag);
          else bump = ex.sign * EXCURSION_C * Math.sin(Math.PI * f);
        }
        set(tag, Math.round((setpointOf(tag, now) + bump + NOISE_SD_C * normal()) * 1000) / 1000, { at: now });
      }
    };
    tick();
    timer = setInterval(tick, tickMs);
  }

  return {
    endpointUrl: `opc.tcp://127.0.0.1:${port}`,
    port,
    nodeIdOf: plantNodeId,
    set,
    addTag,
    trustClient: (der) => serverCertificateManager.trustCertificate(der),
    trustUser: async (der) => {
      if (!userCertificateManager) throw new Error('this plant takes no user certificates');
      await userCertificateManager.trustCertificate(der);
    },
    close: async () => {
      if (timer) clearInterval(timer);
      await server.shutdown(0);
      await serverCertificateManager.dispose();
      await userCertificateManager?.dispose();
    },
  };
}
