import pg from 'pg';

/** The channel the trigger of migrations/pg/0003 notifies when sessions, users or sites change. */
export const SESSION_TABLES_CHANNEL = 'yp_session_tables';

/**
 * Whether the tables a session check reads (sessions, users, sites) may have changed since a moment: `version()`
 * moves on with every notification of the trigger (a change committed by any process, or by hand), every local
 * commit (`bump`, from writeTx) and every loss or regain of the listening connection; it is null while this
 * process does not listen, when nothing may be assumed. A reader keeps what it read under the version it took
 * before reading, and may use it while the version is unchanged.
 */
export type SessionWatch = { version(): number | null; bump(): void; close(): Promise<void> };

const RETRY_MAX_MS = 5_000;

/** Listens on the channel over a connection of its own (outside the pool), reconnecting after a loss. */
export function watchSessionTables(url: string): SessionWatch {
  let version = 0;
  let client: pg.Client | null = null;
  let closed = false;
  let retryMs = 100;
  let timer: ReturnType<typeof setTimeout> | null = null;

  const retry = () => {
    if (closed || timer) return;
    const t = setTimeout(() => {
      timer = null;
      void connect();
    }, retryMs);
    // Waiting to reconnect keeps no process alive.
    (t as unknown as { unref?: () => void }).unref?.();
    timer = t;
    retryMs = Math.min(retryMs * 2, RETRY_MAX_MS);
  };

  const connect = async () => {
    const c = new pg.Client({ connectionString: url, application_name: 'yieldpoint-session-watch' });
    const lost = () => {
      if (client === c) {
        client = null;
        version++;
      }
      retry();
    };
    c.on('notification', () => version++);
    // A broken connection reports an error and then ends; either way the rows kept so far are not trusted.
    c.on('error', () => void c.end().catch(() => undefined));
    c.on('end', lost);
    try {
      await c.connect();
      await c.query(`listen ${SESSION_TABLES_CHANNEL}`);
    } catch {
      await c.end().catch(() => undefined);
      return retry();
    }
    if (closed) return void (await c.end().catch(() => undefined));
    client = c;
    version++;
    retryMs = 100;
  };
  void connect();

  return {
    version: () => (client ? version : null),
    bump: () => void version++,
    async close() {
      closed = true;
      if (timer) clearTimeout(timer);
      const c = client;
      client = null;
      await c?.end().catch(() => undefined);
    },
  };
}
