import crypto from 'node:crypto';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { and, eq } from 'drizzle-orm';
import { AttributeIds, DataType, MessageSecurityMode, OPCUAClient, SecurityPolicy, StatusCodes, UserTokenType } from 'node-opcua';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { batchReadings, deviations } from '../../db/tables';
import { startPlant, type Plant } from '../../server/opcua/plant';
import { openAppPki, type AppPki } from '../../server/opcua/pki';
import { READ_FAMILY } from '../../server/opcua/reader';
import { startControlLink, toCelsius, type ControlLink } from '../../server/services/control-link';
import { startTestApp, type Client, type TestApp } from './harness';

// The read-only control-system link (server/services/control-link.ts) against a local OPC UA server built with
// node-opcua (server/opcua/plant.ts), reached through a TCP relay the tests can cut to play a lost connection.

const TAG = 'R-101 Saccharifier';
const PLANT_USER = { userName: 'reader', password: 'right-password-1' };
// The plant's PKI (its certificate) is kept between runs so its key is made once; Yieldpoint's is made fresh.
const PLANT_PKI = path.join(os.tmpdir(), 'yieldpoint-test-plant-pki');

/** A TCP relay in front of the plant: `cut` drops every connection and refuses new ones until `mend`. */
async function relay(targetPort: number) {
  const sockets = new Set<net.Socket>();
  const server = net.createServer((client) => {
    const upstream = net.connect(targetPort, '127.0.0.1');
    for (const s of [client, upstream]) {
      sockets.add(s);
      s.on('close', () => sockets.delete(s));
      s.on('error', () => s.destroy());
    }
    client.pipe(upstream).pipe(client);
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const port = (server.address() as net.AddressInfo).port;
  let listening = true;
  return {
    url: `opc.tcp://127.0.0.1:${port}`,
    cut: async () => {
      listening = false;
      await new Promise<void>((r) => {
        server.close(() => r());
        for (const s of sockets) s.destroy();
      });
    },
    mend: () => new Promise<void>((r) => ((listening = true), server.listen(port, '127.0.0.1', r))),
    close: async () => {
      for (const s of sockets) s.destroy();
      if (listening) await new Promise<void>((r) => server.close(() => r()));
    },
  };
}

async function until<T>(what: string, f: () => T | undefined | null | false | Promise<T | undefined | null | false>, timeoutMs = 8000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await f();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

let plant: Plant;
let pki: AppPki;
let pkiDir: string;
let t: TestApp;
let link: ControlLink;
let admin: Client;
let operator: Client;
let net1: Awaited<ReturnType<typeof relay>>;
let batchId: number;
let vesselId: number;
const requests: string[] = [];

const controlReadings = () =>
  t.db
    .select()
    .from(batchReadings)
    .where(and(eq(batchReadings.batchId, batchId), eq(batchReadings.source, 'control_system')))
    .execute();
const statusOf = async () =>
  ((await operator.get(`/api/control-link/batches/${batchId}`)).body as { link: { state: string; lastError: string | null; lastValueC: number | null } | null })
    .link;
// Source times a little in the past, distinct to the millisecond, so every value is a new one.
let tick = Date.now() - 60_000;
const nextAt = () => new Date((tick += 1000));

beforeAll(async () => {
  pkiDir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-pki-'));
  [plant, pki] = await Promise.all([startPlant({ pkiFolder: PLANT_PKI, users: [PLANT_USER], tags: [TAG, 'R-204 Lactose tank'] }), openAppPki(pkiDir)]);
  net1 = await relay(plant.port);
  t = await startTestApp(
    {},
    {
      now: new Date(),
      controlLink: (db, clock) =>
        (link = startControlLink({ db, clock, pki, reconcileMs: 0, checkMs: 100, backoff: { minMs: 100, maxMs: 300 }, onRequest: (r) => requests.push(r) })),
    },
  );
  [admin, operator] = await Promise.all([t.signIn('admin'), t.signIn('operator')]);
  const running = ((await operator.get('/api/batches')).body.batches as { id: number; state: string; vesselName: string }[]).find(
    (b) => b.state === 'running' && b.vesselName === TAG,
  )!;
  batchId = running.id;
  vesselId = ((await admin.get('/api/vessels')).body.vessels as { id: number; name: string }[]).find((v) => v.name === TAG)!.id;
  // The server reports at most one change per sampling interval: 100 ms, and the tests space their values more.
  expect((await admin.patch('/api/control-link/settings', { samplingIntervalMs: 100, deadbandC: 0 })).body).toEqual({ samplingIntervalMs: 100, deadbandC: 0 });
}, 60_000);
const pause = (ms = 250) => new Promise((r) => setTimeout(r, ms));

afterAll(async () => {
  await link?.close();
  await t?.close();
  await net1?.close();
  await plant?.close();
  await pki?.dispose();
});

describe('units of a tag', () => {
  it('converts K and degF to degC', () => {
    // Definitions: t/°C = T/K − 273.15 (SI Brochure, 9th ed., 2.3.1); t/°C = (t/°F − 32) × 5/9 (NIST SP 811,
    // appendix B.9). Checks: water freezes at 273.15 K = 32 °F = 0 °C and boils (1 atm) near 212 °F = 100 °C.
    expect(toCelsius(273.15, 'K')).toBeCloseTo(0, 12);
    expect(toCelsius(333.15, 'K')).toBeCloseTo(60, 12);
    expect(toCelsius(32, 'degF')).toBeCloseTo(0, 12);
    expect(toCelsius(212, 'degF')).toBeCloseTo(100, 12);
    expect(toCelsius(-40, 'degF')).toBeCloseTo(-40, 12);
    expect(toCelsius(59.5, 'degC')).toBe(59.5);
  });
});

describe('the application certificate', () => {
  it('is made once beside the data and kept', async () => {
    const first = pki.certificate();
    expect(first.applicationUri).toBe(pki.applicationUri);
    const again = await openAppPki(pkiDir);
    expect(again.certificate().thumbprint).toBe(first.thumbprint);
    await again.dispose();
  });
});

describe('a vessel source', () => {
  it('refuses security None unless confirmed, and audits the confirmation', async () => {
    const body = {
      endpointUrl: net1.url,
      nodeId: plant.nodeIdOf(TAG),
      securityPolicy: 'None',
      securityMode: 'None',
      userName: PLANT_USER.userName,
      password: PLANT_USER.password,
    };
    const refused = await admin.req('PUT', `/api/control-link/sources/${vesselId}`, body);
    expect(refused.status).toBe(400);
    expect(refused.body.error.fields.allowInsecure).toMatch(/confirm/);
    const mixed = await admin.req('PUT', `/api/control-link/sources/${vesselId}`, { ...body, securityMode: 'SignAndEncrypt', allowInsecure: true });
    expect(mixed.status).toBe(400);
    const ok = await admin.req('PUT', `/api/control-link/sources/${vesselId}`, { ...body, allowInsecure: true, isEnabled: false });
    expect(ok.status).toBe(200);
    const audit = (await admin.get('/api/audit-events?limit=20')).body;
    expect(JSON.stringify(audit)).toContain('vessel_source.security_none');
  });

  it('is refused while the server certificate is untrusted, then trusted by thumbprint', async () => {
    const saved = await admin.req('PUT', `/api/control-link/sources/${vesselId}`, { endpointUrl: net1.url, nodeId: plant.nodeIdOf(TAG), ...PLANT_USER });
    expect(saved.status).toBe(200);
    expect(saved.body).toMatchObject({ securityPolicy: 'Basic256Sha256', securityMode: 'SignAndEncrypt', hasPassword: true, trustedThumbprint: null });
    expect(saved.body).not.toHaveProperty('password');
    await link.reconcile();
    expect(await statusOf()).toMatchObject({ state: 'refused', lastError: expect.stringMatching(/certificate is not trusted/) });

    const cert = await admin.get(`/api/control-link/sources/${vesselId}/server-certificate`);
    expect(cert.status).toBe(200);
    expect(cert.body.thumbprint).toMatch(/^([0-9A-F]{2}:){19}[0-9A-F]{2}$/);
    const wrong = await admin.post(`/api/control-link/sources/${vesselId}/trust`, { thumbprint: '00'.repeat(20) });
    expect(wrong.status).toBe(409);
    const trusted = await admin.post(`/api/control-link/sources/${vesselId}/trust`, { thumbprint: cert.body.thumbprint });
    expect(trusted.status).toBe(200);
    expect(trusted.body.trustedThumbprint).toBe(cert.body.thumbprint);
  });
});

describe('values from the plant', () => {
  it('arrive and are stored once, as control-system readings', async () => {
    const values = [59.1, 59.3, 58.9];
    const times = values.map(() => nextAt());
    // The first value is in the history before the link subscribes; the rest arrive live.
    plant.set(TAG, values[0]!, { at: times[0] });
    await link.reconcile();
    await until('connected', async () => (await statusOf())?.state === 'connected');
    for (const [i, v] of values.entries()) {
      if (!i) continue;
      plant.set(TAG, v, { at: times[i] });
      await pause();
    }
    const rows = await until('three readings', async () => ((await controlReadings()).length >= 3 ? controlReadings() : null));
    await new Promise((r) => setTimeout(r, 300));
    expect(await controlReadings()).toHaveLength(3);
    expect(rows.map((r) => [r.takenAt, r.c])).toEqual(times.map((at, i) => [at.toISOString(), values[i]]));
    const detail = (await operator.get(`/api/batches/${batchId}`)).body;
    const cs = detail.readings.filter((r: { source: string }) => r.source === 'control_system');
    expect(cs.every((r: { enteredBy: string }) => r.enteredBy === 'Control system')).toBe(true);
    expect(await statusOf()).toMatchObject({ state: 'connected', lastValueC: 58.9 });
  });

  it('fills a lost connection from the server history when it is back, with no duplicates', async () => {
    const before = (await controlReadings()).length;
    await net1.cut();
    await until('disconnected', async () => (await statusOf())?.state !== 'connected');
    const missed = [59.4, 59.6, 59.2, 59.0].map((c) => ({ c, at: nextAt() }));
    for (const m of missed) plant.set(TAG, m.c, { at: m.at });
    await net1.mend();
    await until('reconnected', async () => (await statusOf())?.state === 'connected');
    const rows = await until('the missed values', async () => ((await controlReadings()).length >= before + missed.length ? controlReadings() : null));
    await new Promise((r) => setTimeout(r, 300));
    expect(await controlReadings()).toHaveLength(before + missed.length);
    expect(rows.slice(-missed.length).map((r) => [r.takenAt, r.c])).toEqual(missed.map((m) => [m.at.toISOString(), m.c]));
    expect(new Set(rows.map((r) => r.takenAt)).size).toBe(rows.length);
  });

  it('does not store a bad status, and raises a lost signal after the site gap limit', async () => {
    const before = (await controlReadings()).length;
    plant.set(TAG, 0, { status: StatusCodes.BadSensorFailure, at: nextAt() });
    await until('the bad status', async () => /BadSensorFailure/.test((await statusOf())?.lastError ?? ''));
    expect(await controlReadings()).toHaveLength(before);
    const lost = () =>
      t.db
        .select()
        .from(deviations)
        .where(and(eq(deviations.batchId, batchId), eq(deviations.kind, 'signal_lost')))
        .execute();
    expect(await lost()).toHaveLength(0);
    // The site's gap limit is 30 min (the default): 31 min without a good value.
    t.clock.advanceMinutes(31);
    const raised = await until('a signal_lost deviation', async () => ((await lost()).length ? lost() : null));
    expect(raised).toHaveLength(1);
    expect(raised[0]!.message).toMatch(/BadSensorFailure.*30 min/);
    await new Promise((r) => setTimeout(r, 300));
    expect(await lost()).toHaveLength(1);
  });

  it('refuses a wrong password with a clear message', async () => {
    const r = await admin.req('PUT', `/api/control-link/sources/${vesselId}`, {
      endpointUrl: net1.url,
      nodeId: plant.nodeIdOf(TAG),
      userName: PLANT_USER.userName,
      password: 'wrong-password',
    });
    expect(r.status).toBe(200);
    await link.reconcile();
    expect(await until('refused', async () => ((await statusOf())?.state === 'refused' ? statusOf() : null))).toMatchObject({
      lastError: 'The server refused the user name or password',
    });
  });
});

describe('a server that checks who connects', () => {
  let strict: Plant;
  const strictDir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-strict-plant-'));
  beforeAll(async () => {
    // Trusts only the client certificates and user certificates its admin listed (none yet).
    strict = await startPlant({
      pkiFolder: `${PLANT_PKI}-strict`,
      users: [PLANT_USER],
      tags: [TAG],
      trustClients: 'listed',
      userCertificates: path.join(strictDir, 'users'),
    });
  }, 30_000);
  afterAll(async () => {
    await strict?.close();
    fs.rmSync(strictDir, { recursive: true, force: true });
  });
  const own = async () =>
    (await admin.get('/api/control-link/status')).body as { certificate: { thumbprint: string }; userCertificate: { thumbprint: string } };
  const refusedWith = async () => until('refused', async () => ((await statusOf())?.state === 'refused' ? (await statusOf())!.lastError : null));
  const trustServer = async () => {
    const cert = await admin.get(`/api/control-link/sources/${vesselId}/server-certificate`);
    expect((await admin.post(`/api/control-link/sources/${vesselId}/trust`, { thumbprint: cert.body.thumbprint })).status).toBe(200);
  };

  it("says so when the server rejects Yieldpoint's application certificate, and connects once it is trusted there", async () => {
    expect(
      (await admin.req('PUT', `/api/control-link/sources/${vesselId}`, { endpointUrl: strict.endpointUrl, nodeId: strict.nodeIdOf(TAG), ...PLANT_USER }))
        .status,
    ).toBe(200);
    await trustServer();
    await link.reconcile();
    const { certificate } = await own();
    expect(await refusedWith()).toBe(
      `The server did not accept Yieldpoint's application certificate (thumbprint ${certificate.thumbprint}): its admin moves it from the server's rejected certificates to the trusted ones`,
    );
    // The plant's admin trusts it; the link's next attempt (backoff 100-300 ms here) gets in.
    await strict.trustClient(Buffer.from(new crypto.X509Certificate(fs.readFileSync(pki.certificateFile)).raw));
    await until('connected', async () => (await statusOf())?.state === 'connected');
  });

  it('logs in with the user certificate instead of a user name, refused until the server trusts it', async () => {
    const base = { endpointUrl: strict.endpointUrl, nodeId: strict.nodeIdOf(TAG) };
    const both = await admin.req('PUT', `/api/control-link/sources/${vesselId}`, { ...base, ...PLANT_USER, userCertificate: true });
    expect(both.status).toBe(400);
    expect(both.body.error.fields.userCertificate).toMatch(/not both/);
    const unsecured = await admin.req('PUT', `/api/control-link/sources/${vesselId}`, {
      ...base,
      securityPolicy: 'None',
      securityMode: 'None',
      allowInsecure: true,
      userCertificate: true,
    });
    expect(unsecured.status).toBe(400);
    expect(unsecured.body.error.fields.userCertificate).toMatch(/secured connection/);

    const saved = await admin.req('PUT', `/api/control-link/sources/${vesselId}`, { ...base, userCertificate: true });
    expect(saved.status).toBe(200);
    // Same server and security: the trusted server certificate stays; the stored password goes.
    expect(saved.body).toMatchObject({ userCertificate: true, userName: null, hasPassword: false, trustedThumbprint: expect.any(String) });
    await link.reconcile();
    const { userCertificate, certificate } = await own();
    expect(userCertificate.thumbprint).not.toBe(certificate.thumbprint);
    expect(await refusedWith()).toBe(
      `The server refused Yieldpoint's user certificate (thumbprint ${userCertificate.thumbprint}): its admin trusts it as a user certificate`,
    );
    await strict.trustUser(pki.userIdentity().certificateData);
    await until('connected', async () => (await statusOf())?.state === 'connected');
  });
});

describe('a server without history', () => {
  it('records the span it cannot fill as a gap, and goes on with live values', async () => {
    const bare = await startPlant({ pkiFolder: `${PLANT_PKI}-bare`, users: [PLANT_USER], tags: [TAG], history: false });
    try {
      const body = { endpointUrl: bare.endpointUrl, nodeId: bare.nodeIdOf(TAG), ...PLANT_USER };
      expect((await admin.req('PUT', `/api/control-link/sources/${vesselId}`, body)).body.trustedThumbprint).toBeNull();
      const cert = await admin.get(`/api/control-link/sources/${vesselId}/server-certificate`);
      expect((await admin.post(`/api/control-link/sources/${vesselId}/trust`, { thumbprint: cert.body.thumbprint })).status).toBe(200);
      const lastBefore = (await controlReadings()).at(-1)!.takenAt;
      await link.reconcile();
      const gaps = ((await operator.get(`/api/control-link/batches/${batchId}`)).body as { gaps: { fromAt: string; toAt: string; reason: string }[] }).gaps;
      expect(gaps).toHaveLength(1);
      expect(gaps[0]).toMatchObject({
        fromAt: new Date(Date.parse(lastBefore) + 1).toISOString(),
        toAt: t.clock.now().toISOString(),
        reason: expect.stringMatching(/No history/),
      });
      const before = (await controlReadings()).length;
      await pause();
      // The test clock is past the earlier values (the lost-signal test moved it): a value stamped now by it.
      bare.set(TAG, 59.7, { at: t.clock.now() });
      await until('a live value', async () => (await controlReadings()).length > before);
    } finally {
      await link.close();
      await bare.close();
    }
  });
});

describe('read-only by construction', () => {
  it('sent only read, browse, subscription and history requests', () => {
    expect(requests).toContain('HistoryReadRequest');
    expect(requests).toContain('CreateMonitoredItemsRequest');
    expect(requests.filter((r) => !READ_FAMILY.has(r))).toEqual([]);
  });

  it('would have caught a write (the recorder sees every request type)', async () => {
    const seen: string[] = [];
    const client = OPCUAClient.create({
      endpointMustExist: false,
      connectionStrategy: { maxRetry: 0 },
      securityMode: MessageSecurityMode.None,
      securityPolicy: SecurityPolicy.None,
    });
    client.on('send_request', (r) => seen.push(r.constructor.name));
    await client.connect(plant.endpointUrl);
    const session = await client.createSession({ type: UserTokenType.UserName, ...PLANT_USER });
    await session.write({
      nodeId: plant.nodeIdOf('R-204 Lactose tank'),
      attributeId: AttributeIds.Value,
      value: { value: { dataType: DataType.Double, value: 1 } },
    });
    await session.close();
    await client.disconnect();
    expect(seen).toContain('WriteRequest');
    expect(READ_FAMILY.has('WriteRequest')).toBe(false);
    expect(READ_FAMILY.has('CallRequest')).toBe(false);
  });
});
