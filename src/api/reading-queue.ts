import type { ReadingInput } from '../contracts/batches';
import { ApiError } from './client';

// Readings typed at the vessel must survive a dropped connection and a closed tab: they wait here, on the
// device, until the server has them. Each carries the key made when it was typed, so sending it again after a
// lost answer stores it once.

export type QueuedReading = ReadingInput & { batchId: number; queuedAt: string };

export interface QueueStore {
  load(): QueuedReading[];
  save(q: QueuedReading[]): void;
}

const STORAGE_KEY = 'yieldpoint.readingQueue.v1';

/** localStorage on the web; memory where there is none (native, tests). */
export function deviceStore(): QueueStore {
  const ls = typeof globalThis.localStorage === 'undefined' ? null : globalThis.localStorage;
  let memory: QueuedReading[] = [];
  return {
    load() {
      if (!ls) return memory;
      try {
        const parsed: unknown = JSON.parse(ls.getItem(STORAGE_KEY) ?? '[]');
        return Array.isArray(parsed) ? (parsed as QueuedReading[]) : [];
      } catch {
        return [];
      }
    },
    save(q) {
      if (ls) ls.setItem(STORAGE_KEY, JSON.stringify(q));
      else memory = q;
    },
  };
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
 * Sends queued readings oldest first. A refusal (4xx) is final: the reading leaves the queue and is reported.
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
    }
    // Remove as we go, re-reading the store so readings queued meanwhile are kept.
    store.save(store.load().filter((x) => x.key !== r.key));
  }
  return result;
}
