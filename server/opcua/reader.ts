import {
  AttributeIds,
  ClientMonitoredItem,
  ClientSubscription,
  DataChangeFilter,
  DataChangeTrigger,
  DeadbandType,
  MessageSecurityMode,
  OPCUAClient,
  resolveNodeId,
  SecurityPolicy,
  StatusCodes,
  TimestampsToReturn,
  UserTokenType,
  type ClientSession,
  type DataValue,
  type HistoryData,
} from 'node-opcua';
import type { VesselSource } from '../../src/contracts/control-link';
import type { AppPki } from './pki';

/**
 * The only module that talks OPC UA as a client, and it can only read: it opens a session, subscribes to data
 * changes, reads history and asks for the server's endpoints. Nothing here calls Write, Call, HistoryUpdate or
 * any node-management service, and the read-only test records every request these functions send.
 */

/** The OPC UA services the client may send: session set-up, read, browse, subscriptions and history read. */
export const READ_FAMILY = new Set([
  'OpenSecureChannelRequest',
  'CloseSecureChannelRequest',
  'GetEndpointsRequest',
  'FindServersRequest',
  'CreateSessionRequest',
  'ActivateSessionRequest',
  'CloseSessionRequest',
  'ReadRequest',
  'BrowseRequest',
  'BrowseNextRequest',
  'TranslateBrowsePathsToNodeIdsRequest',
  'RegisterNodesRequest',
  'UnregisterNodesRequest',
  'HistoryReadRequest',
  'CreateSubscriptionRequest',
  'ModifySubscriptionRequest',
  'SetPublishingModeRequest',
  'DeleteSubscriptionsRequest',
  'TransferSubscriptionsRequest',
  'PublishRequest',
  'RepublishRequest',
  'CreateMonitoredItemsRequest',
  'ModifyMonitoredItemsRequest',
  'DeleteMonitoredItemsRequest',
  'SetMonitoringModeRequest',
]);

export type Connection = Pick<VesselSource, 'endpointUrl' | 'securityPolicy' | 'securityMode' | 'userName' | 'userCertificate'> & { password: string | null };

export type ReaderOptions = Connection & {
  pki: AppPki;
  /** Told the type name of every request sent (the read-only test records them). */
  onRequest?: (requestType: string) => void;
};

/** A refusal in words an admin can act on. */
export class LinkRefused extends Error {}

export type Monitor = { stop(): Promise<void> };
export type HistoryResult = { supported: true; values: DataValue[] } | { supported: false; reason: string };

export type Reader = {
  monitor(nodeId: string, opts: { samplingIntervalMs: number; deadband: number }, onValue: (dv: DataValue) => void): Promise<Monitor>;
  history(nodeId: string, from: Date, to: Date): Promise<HistoryResult>;
  /** Called once when the connection or session is lost. */
  onLost(cb: (why: string) => void): void;
  close(): Promise<void>;
};

const policyUri = (p: Connection['securityPolicy']) => SecurityPolicy[p];
const modeOf = (m: Connection['securityMode']) => MessageSecurityMode[m];

type ChannelOptions = Pick<ReaderOptions, 'endpointUrl' | 'securityPolicy' | 'securityMode' | 'pki' | 'onRequest'>;

function createClient(o: ChannelOptions, secure: boolean) {
  const client = OPCUAClient.create({
    applicationName: o.pki.applicationName,
    applicationUri: o.pki.applicationUri,
    clientCertificateManager: o.pki.manager,
    certificateFile: o.pki.certificateFile,
    privateKeyFile: o.pki.privateKeyFile,
    securityPolicy: secure ? policyUri(o.securityPolicy) : SecurityPolicy.None,
    securityMode: secure ? modeOf(o.securityMode) : MessageSecurityMode.None,
    // The link reconnects itself (with its own backoff and a history backfill): the client library does not.
    connectionStrategy: { maxRetry: 0, initialDelay: 100, maxDelay: 200 },
    endpointMustExist: false,
    keepSessionAlive: true,
    requestedSessionTimeout: 60_000,
  });
  if (o.onRequest) client.on('send_request', (r) => o.onRequest!(r.constructor.name));
  return client;
}

/**
 * Turns node-opcua's errors into what an admin does about them. With the PKI, a refusal of Yieldpoint's own
 * certificate names its thumbprint, which the plant's admin looks for in the server's list of rejected certificates.
 */
export function explain(err: unknown, o: Pick<Connection, 'endpointUrl'> & Partial<Pick<Connection, 'userCertificate'>> & { pki?: AppPki }): string {
  const m = err instanceof Error ? err.message : String(err);
  const thumb = (which: 'certificate' | 'userCertificate') => (o.pki ? ` (thumbprint ${o.pki[which]().thumbprint})` : '');
  if (/ECONNREFUSED|ENOTFOUND|EHOSTUNREACH|ETIMEDOUT|connect failed|Connection Break|socket has been disconnected/i.test(m))
    return `No OPC UA server answers at ${o.endpointUrl}`;
  if (/server Certificate verification failed/i.test(m))
    return "The server's certificate is not trusted: an admin compares its thumbprint and trusts it on the vessel's source";
  if (/BadUserAccessDenied|BadIdentityTokenRejected|BadIdentityTokenInvalid/.test(m))
    return o.userCertificate
      ? `The server refused Yieldpoint's user certificate${thumb('userCertificate')}: its admin trusts it as a user certificate`
      : 'The server refused the user name or password';
  if (/BadCertificate|BadSecurityChecksFailed/.test(m))
    return `The server did not accept Yieldpoint's application certificate${thumb('certificate')}: its admin moves it from the server's rejected certificates to the trusted ones`;
  if (/BadSecurityPolicyRejected|BadSecurityModeRejected|cannot find endpoint|No endpoint/i.test(m))
    return 'The server offers no endpoint with this security policy and mode';
  return m.split('\n')[0]!.slice(0, 300);
}

/** The server's certificate for this policy and mode, from GetEndpoints (an unsecured discovery request). */
export async function serverCertificate(o: ChannelOptions): Promise<Buffer> {
  const client = createClient(o, false);
  try {
    await client.connect(o.endpointUrl);
    const endpoints = await client.getEndpoints();
    const ep =
      endpoints.find((e) => e.securityPolicyUri === policyUri(o.securityPolicy) && e.securityMode === modeOf(o.securityMode)) ??
      endpoints.find((e) => e.serverCertificate?.length);
    if (!ep?.serverCertificate?.length) throw new LinkRefused('The server sent no certificate');
    return Buffer.from(ep.serverCertificate);
  } catch (err) {
    throw err instanceof LinkRefused ? err : new LinkRefused(explain(err, o));
  } finally {
    await client.disconnect().catch(() => {});
  }
}

/** Checks a node id's syntax before it is stored. */
export function isNodeId(text: string): boolean {
  try {
    resolveNodeId(text);
    return true;
  } catch {
    return false;
  }
}

/** Connects and opens a session (the user certificate, or user name and password, else anonymous). Throws LinkRefused. */
export async function openReader(o: ReaderOptions, publishingIntervalMs: number): Promise<Reader> {
  const client = createClient(o, o.securityPolicy !== 'None');
  let session: ClientSession | null = null;
  let subscription: ClientSubscription | null = null;
  let lost: ((why: string) => void) | null = null;
  let done = false;
  const fire = (why: string) => {
    if (done) return;
    done = true;
    lost?.(why);
  };
  try {
    await client.connect(o.endpointUrl);
    session = await client.createSession(
      o.userCertificate
        ? { type: UserTokenType.Certificate, ...o.pki.userIdentity() }
        : o.userName
          ? { type: UserTokenType.UserName, userName: o.userName, password: o.password ?? '' }
          : { type: UserTokenType.Anonymous },
    );
    subscription = await session.createSubscription2({
      requestedPublishingInterval: publishingIntervalMs,
      requestedLifetimeCount: 120,
      requestedMaxKeepAliveCount: 10,
      maxNotificationsPerPublish: 0,
      publishingEnabled: true,
      priority: 1,
    });
  } catch (err) {
    await client.disconnect().catch(() => {});
    throw new LinkRefused(explain(err, o));
  }
  client.on('connection_lost', () => fire('The connection to the server was lost'));
  client.on('close', () => fire('The connection to the server closed'));
  session.on('session_closed', () => fire('The server closed the session'));
  subscription.on('terminated', () => fire('The server ended the subscription'));
  const s = session;
  const sub = subscription;
  return {
    monitor: async (nodeId, opts, onValue) => {
      const item = ClientMonitoredItem.create(
        sub,
        { nodeId: resolveNodeId(nodeId), attributeId: AttributeIds.Value },
        {
          samplingInterval: opts.samplingIntervalMs,
          // Room for a few publishing intervals of values, so none is dropped between two publish answers.
          queueSize: 100,
          discardOldest: true,
          filter: new DataChangeFilter({
            trigger: DataChangeTrigger.StatusValue,
            deadbandType: opts.deadband > 0 ? DeadbandType.Absolute : DeadbandType.None,
            deadbandValue: opts.deadband,
          }),
        },
        TimestampsToReturn.Both,
      );
      await new Promise<void>((resolve, reject) => {
        item.once('initialized', () => resolve());
        item.once('err', (m: string) => reject(new LinkRefused(/BadNodeIdUnknown/.test(m) ? `The server has no node ${nodeId}` : m)));
      });
      item.on('changed', onValue);
      return { stop: () => item.terminate().catch(() => {}) };
    },
    history: async (nodeId, from, to) => {
      const values: DataValue[] = [];
      let start = from;
      // A server may answer a long span in pages: ask again from the last value until a short page comes back.
      for (let page = 0; page < 100; page++) {
        const r = await s.readHistoryValue({ nodeId: resolveNodeId(nodeId) }, start, to, {
          numValuesPerNode: 10_000,
          timestampsToReturn: TimestampsToReturn.Both,
        });
        if (r.statusCode.isNotGood() && r.statusCode.value !== StatusCodes.GoodNoData.value)
          return { supported: false, reason: `History read answered ${r.statusCode.name}` };
        const got = ((r.historyData as HistoryData | null)?.dataValues ?? []).filter(
          (dv) => !values.length || (dv.sourceTimestamp?.getTime() ?? 0) > start.getTime(),
        );
        values.push(...got);
        if (!r.continuationPoint?.length && got.length < 10_000) break;
        const last = got.at(-1)?.sourceTimestamp;
        if (!last) break;
        start = last;
      }
      return { supported: true, values };
    },
    onLost: (cb) => {
      lost = cb;
    },
    close: async () => {
      done = true;
      await sub.terminate().catch(() => {});
      await s.close().catch(() => {});
      await client.disconnect().catch(() => {});
    },
  };
}
