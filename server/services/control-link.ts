import type { DataValue } from 'node-opcua';
import { batchHours, signalLostDeviation } from '../../src/batches';
import { READING_MAX_C, READING_MIN_C } from '../../src/contracts/batches';
import type { LinkStatus } from '../../src/contracts/control-link';
import { writeTx, type Db } from '../../db/client';
import type { SessionUser } from '../../src/contracts/session';
import type { Clock } from '../clock';
import type { AppPki } from '../opcua/pki';
import { explain, LinkRefused, openReader, type Connection, type Monitor, type Reader } from '../opcua/reader';
import { insertLinkGap, lastControlReadingAt, listSiteIds, listSiteSources, sourcesOfRunningBatches, type VesselSourceRow } from '../repositories/control-link';
import { appendAudit } from './audit';
import { batchSettingsOf } from './batches';
import { checkForecastLow, raiseBatchDeviation } from './deviations';
import { readingIngest, type ReadingIngest } from './readings';
import { controlSystemUser, linkSettingsOf, quietLink } from './control-sources';

/**
 * The control-system link: for every running batch whose vessel has an enabled source, a monitored item on the
 * vessel's tag. Good values go through the same ingest as phone readings (group commit, deviation rules,
 * forecast), keyed by their source timestamp so a value is stored once however often it arrives. Bad or stale
 * values are not readings; a vessel silent for longer than the site's gap limit raises a "signal lost"
 * deviation. A lost connection is retried with exponential backoff; once back, the gap is filled from the
 * server's history (HistoryRead) or, where the server has none, recorded as a gap the batch chart shows.
 * Sources sharing a server, security and account share one session and subscription.
 */
export type ControlLinkOptions = {
  db: Db;
  clock: Clock;
  pki: AppPki;
  /** How often running batches and sources are looked up again; 0: only on `changed()` / `reconcile()`. */
  reconcileMs?: number;
  /** Lost-signal check period. */
  checkMs?: number;
  backoff?: { minMs: number; maxMs: number };
  /** Every OPC UA request type the link sends (the read-only test). */
  onRequest?: (requestType: string) => void;
  /** Each newly stored value: its source time, when it arrived and when it was on disk (the load benchmark). */
  onStored?: (sourceMs: number, receivedMs: number, storedMs: number) => void;
};

export type ControlLink = {
  pki: AppPki;
  onRequest?: (requestType: string) => void;
  /** Sources or settings changed: look again soon. */
  changed(): void;
  /** Brings subscriptions in line with running batches and sources now. */
  reconcile(): Promise<void>;
  status(siteId: number): Promise<LinkStatus[]>;
  /** The link of the batch's vessel while the batch runs, else null. */
  batchLink(siteId: number, batchId: number): Promise<LinkStatus | null>;
  close(): Promise<void>;
};

type Tap = {
  siteId: number;
  vesselId: number;
  vesselName: string;
  batchId: number;
  startedAt: string;
  source: VesselSourceRow;
  conn: Conn;
  monitor: Monitor | null;
  /** Clock time of the last good value, else when the tap began. */
  lastGoodAtMs: number;
  lastSourceMs: number;
  lastValueC: number | null;
  lastError: string | null;
  errors: number;
  stored: number;
  lostRaised: boolean;
  /** When the P10 forecast check last ran for this tap's batch (clock ms); due again a minute later. */
  forecastAtMs: number;
  forecastQueued: boolean;
};

type Conn = {
  key: string;
  connection: Connection;
  siteId: number;
  samplingIntervalMs: number;
  deadbandC: number;
  reader: Reader | null;
  state: 'connecting' | 'connected' | 'disconnected' | 'refused';
  attempt: number;
  timer: ReturnType<typeof setTimeout> | null;
  taps: Map<number, Tap>;
  /** When the link was last seen working: the start of a gap to fill after a loss. */
  lostAtMs: number | null;
  closed: boolean;
};

/** A tag's value in °C: K − 273.15 (SI Brochure 9th ed., 2.3.1), (°F − 32) × 5/9. */
export const toCelsius = (v: number, unit: VesselSourceRow['unit']) => (unit === 'K' ? v - 273.15 : unit === 'degF' ? ((v - 32) * 5) / 9 : v);
// The deadband is set in °C; a tag in K has the same step, one in °F 1.8 times it.
const deadbandIn = (c: number, unit: VesselSourceRow['unit']) => (unit === 'degF' ? c * 1.8 : c);
const connKey = (siteId: number, s: VesselSourceRow) =>
  JSON.stringify([siteId, s.endpointUrl, s.securityPolicy, s.securityMode, s.userName, s.password, s.userCertificate, s.trustedThumbprint]);
/** What a tap depends on: any change makes a new one. */
const tapSignature = (s: VesselSourceRow) =>
  JSON.stringify([
    s.nodeId,
    s.unit,
    s.isEnabled,
    s.endpointUrl,
    s.securityPolicy,
    s.securityMode,
    s.userName,
    s.password,
    s.userCertificate,
    s.trustedThumbprint,
  ]);
const readingKey = (sourceMs: number) => `opcua:${new Date(sourceMs).toISOString()}`;
/**
 * The server sends a change at once and then at most one per sampling interval; it holds notifications until the
 * next publish. Publishing ten times per sampling interval (50-250 ms) keeps the delay to the database short.
 */
const publishingMs = (samplingMs: number) => Math.max(50, Math.min(250, samplingMs / 10));
/** A gap shorter than this after a reconnect is just the reconnect itself, not worth marking. */
const MIN_GAP_MS = 5000;
/**
 * Values handed to the ingest per turn of the event loop, each turn's one group commit. A publish answer carries
 * every tag sampled at that instant: 200 readings of 200 batches took 54 ms CPU in one transaction on this 2-core
 * machine (load average 13), 10 ms in parts of 25; other requests get in between the parts.
 */
const VALUES_PER_TURN = 25;
/** The P10 forecast check (an integration of the whole batch) at most this often per batch, one batch per turn. */
const FORECAST_EVERY_MS = 60_000;
const nextTurn = (fn: () => void) => void setImmediate(fn);

export function startControlLink(o: ControlLinkOptions): ControlLink {
  const { db, clock } = o;
  const services = { db, clock };
  // Same ingest as phone readings; the P10 forecast check runs apart, once a minute per batch (checkForecasts).
  const ingest: ReadingIngest = readingIngest(services, { checkForecast: false });
  const backoff = o.backoff ?? { minMs: 1000, maxMs: 60_000 };
  const conns = new Map<string, Conn>();
  const taps = new Map<number, Tap>();
  const users = new Map<number, Promise<SessionUser>>();
  let closed = false;
  // One lookup per site, shared by the values that arrive meanwhile; a failed one is tried again by the next value.
  const userOf = (siteId: number): Promise<SessionUser> => {
    let u = users.get(siteId);
    if (!u) {
      users.set(siteId, (u = controlSystemUser(db, siteId)));
      u.catch(() => users.delete(siteId));
    }
    return u;
  };
  // The site's gap limit, read again at most every few seconds (every value needs it). The values that arrive while
  // it is read share one read and resume in their arrival order: onValue's repeat check depends on that order.
  const gapLimits = new Map<number, { atMs: number; gapMs: Promise<number> }>();
  const gapLimitMs = (siteId: number, nowMs: number): Promise<number> => {
    const hit = gapLimits.get(siteId);
    if (hit && nowMs - hit.atMs < 5000) return hit.gapMs;
    const gapMs = batchSettingsOf(db, siteId).then((s) => s.gapLimitMin * 60_000);
    gapLimits.set(siteId, { atMs: nowMs, gapMs });
    gapMs.catch(() => gapLimits.delete(siteId));
    return gapMs;
  };

  // Values ---------------------------------------------------------------------------------------------

  // Values wait here in arrival order and go to the ingest VALUES_PER_TURN at a time, one group commit per turn.
  let waiting: { tap: Tap; dv: DataValue; live: boolean; receivedMs: number; done: () => void }[] = [];
  let draining = false;
  const drain = () => {
    const part = waiting.slice(0, VALUES_PER_TURN);
    waiting = waiting.slice(VALUES_PER_TURN);
    for (const w of part)
      onValue(w.tap, w.dv, w.live, w.receivedMs).then(w.done, (err: unknown) => {
        // A value the database could not take (not writable, the batch gone) is counted on its tap, never thrown.
        w.tap.errors++;
        w.tap.lastError = err instanceof Error ? err.message : String(err);
        w.done();
      });
    if (waiting.length) nextTurn(drain);
    else draining = false;
  };
  const take = (tap: Tap, dv: DataValue, live: boolean) =>
    new Promise<void>((done) => {
      waiting.push({ tap, dv, live, receivedMs: Date.now(), done });
      if (!draining) {
        draining = true;
        nextTurn(drain);
      }
    });

  async function onValue(tap: Tap, dv: DataValue, live: boolean, receivedMs: number): Promise<void> {
    const bad = (why: string) => {
      tap.errors++;
      tap.lastError = why;
    };
    if (!dv.statusCode.isGood()) return bad(`The server reports ${dv.statusCode.name} for ${tap.source.nodeId}`);
    const v = dv.value?.value;
    if (typeof v !== 'number' || !Number.isFinite(v)) return bad(`${tap.source.nodeId} is not a number`);
    const sourceMs = dv.sourceTimestamp?.getTime();
    if (!sourceMs) return bad(`${tap.source.nodeId} came without a source time`);
    const nowMs = clock.now().getTime();
    const gapMs = await gapLimitMs(tap.siteId, nowMs);
    // A live value no newer than the last is a repeat (the first one after subscribing): already handled.
    if (live && sourceMs <= tap.lastSourceMs) return;
    // One older than the gap limit is stale: the server holds on to an old value. Not a reading.
    if (live && nowMs - sourceMs > gapMs) return bad(`Stale value from ${new Date(sourceMs).toISOString()}`);
    const c = Math.round(toCelsius(v, tap.source.unit) * 1000) / 1000;
    if (c < READING_MIN_C || c > READING_MAX_C) return bad(`${c} °C from ${tap.source.nodeId} is not a plausible reactor temperature`);
    if (sourceMs < Date.parse(tap.startedAt)) return;
    if (sourceMs > tap.lastSourceMs) {
      tap.lastSourceMs = sourceMs;
      tap.lastValueC = c;
    }
    tap.lastGoodAtMs = Math.max(tap.lastGoodAtMs, live ? nowMs : Math.min(nowMs, sourceMs));
    if (live) tap.lostRaised = false;
    tap.lastError = null;
    return ingest
      .log(await userOf(tap.siteId), tap.batchId, { key: readingKey(sourceMs), takenAt: new Date(sourceMs).toISOString(), c }, 'control_system')
      .then(
        (r) => {
          if (!r.created) return;
          tap.stored++;
          o.onStored?.(sourceMs, receivedMs, Date.now());
          forecastLater(tap);
        },
        (err: unknown) => bad(err instanceof Error ? err.message : String(err)),
      );
  }

  // The P10 forecast check of a batch with new readings, due once a minute, one batch per turn, outside the
  // readings' transactions: a site of many vessels never checks them all in one turn.
  const forecastQueue: Tap[] = [];
  function forecastLater(tap: Tap) {
    if (tap.forecastQueued || clock.now().getTime() - tap.forecastAtMs < FORECAST_EVERY_MS) return;
    tap.forecastQueued = true;
    if (forecastQueue.push(tap) === 1) nextTurn(checkForecasts);
  }
  async function checkForecasts() {
    const tap = forecastQueue.shift();
    if (!tap) return;
    tap.forecastQueued = false;
    tap.forecastAtMs = clock.now().getTime();
    if (!closed && taps.get(tap.vesselId) === tap) {
      try {
        await checkForecastLow(services, await userOf(tap.siteId), tap.batchId);
      } catch (err) {
        tap.lastError = err instanceof Error ? err.message : String(err);
      }
    }
    if (forecastQueue.length) nextTurn(checkForecasts);
  }

  /** Fills the span since the batch's last control-system reading from the server's history; else marks a gap. */
  async function backfill(tap: Tap, reader: Reader, lostAtMs: number | null): Promise<boolean> {
    const last = await lastControlReadingAt(db, tap.batchId);
    const fromMs = Math.max(Date.parse(tap.startedAt), last ? Date.parse(last) + 1 : 0);
    const to = clock.now();
    if (to.getTime() - fromMs < 1000) return true;
    const h = await reader.history(tap.source.nodeId, new Date(fromMs), to);
    if (h.supported) {
      await Promise.all(h.values.map((dv) => take(tap, dv, false)));
      return true;
    }
    tap.lastError = h.reason;
    // A gap is what the link missed: since it was lost, else since its last reading of the batch (none: no gap).
    if (lostAtMs === null && !last) return false;
    const gapFrom = lostAtMs ?? fromMs;
    if (to.getTime() - gapFrom < MIN_GAP_MS) return false;
    await writeTx(db, async (t) => {
      const row = await insertLinkGap(t, {
        siteId: tap.siteId,
        batchId: tap.batchId,
        fromAt: new Date(gapFrom).toISOString(),
        toAt: to.toISOString(),
        reason: `No history on the server (${h.reason})`,
      });
      await appendAudit(t, {
        siteId: tap.siteId,
        userId: (await userOf(tap.siteId)).id,
        actor: 'control system',
        action: 'link.gap',
        entity: 'batch',
        entityId: tap.batchId,
        newValue: { fromAt: row.fromAt, toAt: row.toAt, reason: row.reason },
        at: to,
      });
    });
    return false;
  }

  async function attach(conn: Conn, tap: Tap): Promise<void> {
    const reader = conn.reader;
    if (!reader || tap.monitor) return;
    try {
      const hasHistory = await backfill(tap, reader, conn.lostAtMs);
      tap.monitor = await reader.monitor(
        tap.source.nodeId,
        { samplingIntervalMs: conn.samplingIntervalMs, deadband: deadbandIn(conn.deadbandC, tap.source.unit) },
        (dv) => {
          if (taps.get(tap.vesselId) === tap) void take(tap, dv, true);
        },
      );
      // Values written between the history read and the subscription: read that short span again (keys dedupe).
      if (hasHistory) await backfill(tap, reader, null);
    } catch (err) {
      tap.errors++;
      tap.lastError = err instanceof LinkRefused ? err.message : explain(err, conn.connection);
    }
  }

  // Connections ----------------------------------------------------------------------------------------

  function schedule(conn: Conn) {
    if (conn.closed || closed || conn.timer) return;
    const delay = Math.min(backoff.maxMs, backoff.minMs * 2 ** Math.min(conn.attempt, 16));
    conn.attempt++;
    conn.timer = setTimeout(() => {
      conn.timer = null;
      void connect(conn);
    }, delay);
  }

  async function connect(conn: Conn): Promise<void> {
    if (conn.closed || closed) return;
    const first = [...conn.taps.values()][0];
    if (conn.connection.securityPolicy !== 'None' && !first?.source.trustedThumbprint) {
      conn.state = 'refused';
      for (const t of conn.taps.values()) t.lastError = "The server's certificate is not trusted yet: an admin trusts it on the vessel's source";
      return;
    }
    conn.state = 'connecting';
    let reader: Reader;
    try {
      reader = await openReader({ ...conn.connection, pki: o.pki, onRequest: o.onRequest }, publishingMs(conn.samplingIntervalMs));
    } catch (err) {
      const why = err instanceof LinkRefused ? err.message : explain(err, conn.connection);
      conn.state = /refused|not trusted|did not accept|no endpoint/i.test(why) ? 'refused' : 'disconnected';
      for (const t of conn.taps.values()) {
        t.errors++;
        t.lastError = why;
      }
      schedule(conn);
      return;
    }
    if (conn.closed || closed) return void (await reader.close());
    conn.reader = reader;
    conn.state = 'connected';
    conn.attempt = 0;
    reader.onLost((why) => {
      if (conn.reader !== reader) return;
      conn.reader = null;
      conn.state = 'disconnected';
      conn.lostAtMs = clock.now().getTime();
      for (const t of conn.taps.values()) {
        t.monitor = null;
        t.lastError = why;
      }
      void reader.close();
      schedule(conn);
    });
    for (const t of conn.taps.values()) await attach(conn, t);
    conn.lostAtMs = null;
  }

  async function closeConn(conn: Conn) {
    conn.closed = true;
    if (conn.timer) clearTimeout(conn.timer);
    conns.delete(conn.key);
    const r = conn.reader;
    conn.reader = null;
    await r?.close();
  }

  // Reconcile ------------------------------------------------------------------------------------------

  async function reconcileNow(): Promise<void> {
    if (closed) return;
    const wanted = new Map<number, { siteId: number; row: Awaited<ReturnType<typeof sourcesOfRunningBatches>>[number] }>();
    for (const siteId of await listSiteIds(db)) for (const row of await sourcesOfRunningBatches(db, siteId)) wanted.set(row.source.vesselId, { siteId, row });
    const settingsOf = new Map<number, Awaited<ReturnType<typeof linkSettingsOf>>>();
    const settings = async (siteId: number) => settingsOf.get(siteId) ?? settingsOf.set(siteId, await linkSettingsOf(db, siteId)).get(siteId)!;
    // Taps whose batch closed, or whose source or settings changed, go.
    for (const tap of [...taps.values()]) {
      const w = wanted.get(tap.vesselId);
      const s = await settings(tap.siteId);
      if (
        w &&
        w.row.batchId === tap.batchId &&
        tapSignature(w.row.source) === tapSignature(tap.source) &&
        s.samplingIntervalMs === tap.conn.samplingIntervalMs &&
        s.deadbandC === tap.conn.deadbandC
      )
        continue;
      taps.delete(tap.vesselId);
      tap.conn.taps.delete(tap.vesselId);
      await tap.monitor?.stop();
    }
    const starting: Conn[] = [];
    for (const [vesselId, { siteId, row }] of wanted) {
      if (taps.has(vesselId)) continue;
      const s = await settings(siteId);
      const key = connKey(siteId, row.source) + `|${s.samplingIntervalMs}|${s.deadbandC}`;
      let conn = conns.get(key);
      if (!conn) {
        const c = row.source;
        conn = {
          key,
          connection: {
            endpointUrl: c.endpointUrl,
            securityPolicy: c.securityPolicy,
            securityMode: c.securityMode,
            userName: c.userName,
            password: c.password,
            userCertificate: c.userCertificate,
          },
          siteId,
          samplingIntervalMs: s.samplingIntervalMs,
          deadbandC: s.deadbandC,
          reader: null,
          state: 'connecting',
          attempt: 0,
          timer: null,
          taps: new Map(),
          lostAtMs: null,
          closed: false,
        };
        conns.set(key, conn);
      }
      const tap: Tap = {
        siteId,
        vesselId,
        vesselName: row.vesselName,
        batchId: row.batchId,
        startedAt: row.startedAt,
        source: row.source,
        conn,
        monitor: null,
        lastGoodAtMs: clock.now().getTime(),
        lastSourceMs: 0,
        lastValueC: null,
        lastError: null,
        errors: 0,
        stored: 0,
        lostRaised: false,
        forecastAtMs: -Infinity,
        forecastQueued: false,
      };
      taps.set(vesselId, tap);
      conn.taps.set(vesselId, tap);
      if (conn.reader) await attach(conn, tap);
      else if (conn.taps.size === 1 && !conn.timer) starting.push(conn);
    }
    // New connections attach every tap added above; the reconcile ends once they are up (or refused).
    await Promise.all(starting.map(connect));
    for (const conn of [...conns.values()]) if (!conn.taps.size) await closeConn(conn);
  }

  let chain: Promise<void> = Promise.resolve();
  const reconcile = () => (chain = chain.then(reconcileNow, reconcileNow));

  // Lost signal ----------------------------------------------------------------------------------------

  async function checkSignals() {
    const now = clock.now();
    for (const tap of taps.values()) {
      if (tap.lostRaised) continue;
      const gapLimitMin = (await batchSettingsOf(db, tap.siteId)).gapLimitMin;
      const draft = signalLostDeviation(
        gapLimitMin,
        Math.max(0, batchHours(tap.startedAt, new Date(tap.lastGoodAtMs).toISOString())),
        batchHours(tap.startedAt, now.toISOString()),
        tap.lastError ?? (tap.conn.state === 'connected' ? 'no new value' : `link ${tap.conn.state}`),
      );
      if (!draft) continue;
      tap.lostRaised = true;
      try {
        await raiseBatchDeviation(services, await userOf(tap.siteId), tap.batchId, draft);
      } catch (err) {
        tap.lastError = err instanceof Error ? err.message : String(err);
      }
    }
  }

  const timers = [setInterval(checkSignals, o.checkMs ?? 5000)];
  if (o.reconcileMs !== 0) timers.push(setInterval(() => void reconcile(), o.reconcileMs ?? 5000));
  let pending: ReturnType<typeof setTimeout> | null = null;
  void reconcile();

  // Status ---------------------------------------------------------------------------------------------

  const statusOf = (siteId: number, row: { source: VesselSourceRow; vesselName: string }, nowMs: number): LinkStatus => {
    const tap = taps.get(row.source.vesselId);
    if (!tap || tap.siteId !== siteId) return quietLink(row, row.source.isEnabled ? 'idle' : 'disabled');
    return {
      vesselId: row.source.vesselId,
      vesselName: row.vesselName,
      batchId: tap.batchId,
      state: tap.conn.state,
      lastValueC: tap.lastValueC,
      lastValueAt: tap.lastSourceMs ? new Date(tap.lastSourceMs).toISOString() : null,
      ageS: tap.lastSourceMs ? Math.max(0, Math.round((nowMs - tap.lastSourceMs) / 100) / 10) : null,
      lastError: tap.lastError,
      errors: tap.errors,
      stored: tap.stored,
    };
  };

  return {
    pki: o.pki,
    onRequest: o.onRequest,
    changed: () => {
      if (pending || closed) return;
      pending = setTimeout(() => {
        pending = null;
        void reconcile();
      }, 50);
    },
    reconcile,
    status: async (siteId) => {
      const now = clock.now().getTime();
      return (await listSiteSources(db, siteId)).map((r) => statusOf(siteId, r, now));
    },
    batchLink: async (siteId, batchId) => {
      const now = clock.now().getTime();
      const tap = [...taps.values()].find((t) => t.batchId === batchId && t.siteId === siteId);
      const row = tap ? (await listSiteSources(db, siteId)).find((r) => r.source.vesselId === tap.vesselId) : undefined;
      return row ? statusOf(siteId, row, now) : null;
    },
    close: async () => {
      closed = true;
      timers.forEach(clearInterval);
      if (pending) clearTimeout(pending);
      await chain.catch(() => {});
      await Promise.all([...conns.values()].map(closeConn));
      taps.clear();
    },
  };
}
