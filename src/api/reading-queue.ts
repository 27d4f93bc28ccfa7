import type { ReadingInput } from '../contracts/batches';
import { ApiError } from './client';

// Readings typed at the vessel must survive a dropped connection and a closed tab: they wait here, on the
// device, until the server has them. Each carries the key made when it was typed, so sending it again after a
// lost answer stores it once.

export type QueuedReading = ReadingInput & { batchId: number; queuedAt: string };
/** A reading the server refused on arrival (the batch closed meanwhile, a key reused): kept until dismissed. */
export type RefusedReading = { reading: QueuedReading; code: string; message: string };

export interface QueueStore {
  load(): QueuedReading[];
  save(q: QueuedReading[]): void;
  loadRefused(): RefusedReading[];
  saveRefused(r: RefusedReading[]): void;
}

/**
 * One user's queue and refusals: localStorage on the web, under keys of that user, so a shared phone never
 * sends or shows one operator's readings in another's session; memory where there is no localStorage (tests).
 */
export function deviceStore(userId: number): QueueStore {
  const ls = typeof globalThis.localStorage === 'undefined' ? null : globalThis.localStorage;
  const memory = new Map<string, unknown[]>();
  const list = <T>(key: string) => ({
    load(): T[] {
      if (!ls) return (memory.get(key) ?? []) as T[];
      try {
        const parsed: unknown = JSON.parse(ls.getItem(key) ?? '[]');
        return Array.isArray(parsed) ? (parsed as T[]) : [];
      } catch {
        return [];
      }
    },
    save(items: T[]) {
      if (ls) ls.setItem(key, JSON.stringify(items));
      else memory.set(key, items);
    },
  });
  const queue = list<QueuedReading>(`yieldpoint.readingQueue.v2.${userId}`);
  const refused = list<RefusedReading>(`yieldpoint.readingsRefused.v1.${userId}`);
  return { load: queue.load, save: queue.save, loadRefused: refused.load, saveRefused: refused.save };
}

/** A key unique to this reading on this device. */
export function newReadingKey(): string {
  const c = globalThis.crypto;
  if (c && typeof c.randomUUID === 'function') return `r-${c.randomUUID()}`;
  return `r-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 12)}`;
}

export function enqueue(store: QueueStore, r: QueuedReading): void {
  const q = store.load();
  if (!q.some((x) => x.key === r.key)) store.save([...q, r]);
}

export type FlushResult = { sent: QueuedReading[]; rejected: { reading: QueuedReading; error: ApiError }[]; isOffline: boolean };

/**
 * Sends queued readings oldest first. A refusal (4xx) is final: the reading leaves the queue for the store's
 * refusals, with the server's reason, and is reported.
 * No connection or a server failure stops the round and keeps the rest for the next one.
 */
export async function flushQueue(store: QueueStore, send: (r: QueuedReading) => Promise<unknown>): Promise<FlushResult> {
  const result: FlushResult = { sent: [], rejected: [], isOffline: false };
  for (const r of store.load()) {
    try {
      await send(r);
      result.sent.push(r);
    } catch (e) {
      const err = e instanceof ApiError ? e : new ApiError(0, 'network', String(e));
      if (err.status === 0 || err.status >= 500 || err.status === 429) {
        result.isOffline = err.status === 0;
        break;
      }
      result.rejected.push({ reading: r, error: err });
      store.saveRefused([...store.loadRefused(), { reading: r, code: err.code, message: err.message }]);
    }
    // Remove as we go, re-reading the store so readings queued meanwhile are kept.
    store.save(store.load().filter((x) => x.key !== r.key));
  }
  return result;
}
