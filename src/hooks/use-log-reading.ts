import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { useSWRConfig } from 'swr';
import { api } from '../api/client';
import { keys } from '../api/keys';
import { deviceStore, enqueue, flushQueue, newReadingKey, type QueuedReading, type QueueStore, type RefusedReading } from '../api/reading-queue';
import type { ReadingResult } from '../contracts/batches';
import { useSession } from './use-session';

// One store per user for the app: the queue outlives the screen that filled it.
const stores = new Map<number, QueueStore>();
const storeFor = (userId: number) => {
  if (!stores.has(userId)) stores.set(userId, deviceStore(userId));
  return stores.get(userId)!;
};
const RETRY_MS = 15_000;
const NONE: never[] = [];

/**
 * Logs readings through the signed-in user's device queue: each is saved on the device first, then sent; unsent
 * ones are retried when the network returns and every 15 s. Returns this batch's unsent readings (for the table
 * and the preview), those the server refused (with its reason, until dismissed) and how many the last round sent.
 */
export function useLogReading(batchId: number) {
  const { mutate } = useSWRConfig();
  const userId = useSession().session?.user.id ?? null;
  const store = userId === null ? null : storeFor(userId);
  const ofBatch = useCallback(() => (store ? store.load().filter((r) => r.batchId === batchId) : NONE), [store, batchId]);
  const refusedOfBatch = useCallback(() => (store ? store.loadRefused().filter((r) => r.reading.batchId === batchId) : NONE), [store, batchId]);
  const [queued, setQueued] = useState<QueuedReading[]>(ofBatch);
  const [refused, setRefused] = useState<RefusedReading[]>(refusedOfBatch);
  const [sentCount, setSentCount] = useState(0);
  const [isOffline, setOffline] = useState(false);
  const busy = useRef(false);

  // `fresh`: the key of a reading logged just now, which was never shown as waiting on the device.
  const flush = useCallback(
    async (fresh?: string) => {
      if (!store || busy.current) return;
      busy.current = true;
      try {
        const r = await flushQueue(store, (x) =>
          api<ReadingResult>(`/batches/${x.batchId}/readings`, {
            method: 'POST',
            body: { key: x.key, takenAt: x.takenAt, c: x.c, ...(x.note ? { note: x.note } : {}) },
          }),
        );
        setOffline(r.isOffline);
        // The stored readings are read again before the device's copies leave the table, so a row never vanishes.
        if (r.sent.length || r.rejected.length) await mutate((k) => typeof k === 'string' && k.startsWith(keys.batches));
        const waited = r.sent.filter((x) => x.batchId === batchId && x.key !== fresh).length;
        if (waited) setSentCount(waited);
      } finally {
        busy.current = false;
        setQueued(ofBatch());
        setRefused(refusedOfBatch());
      }
    },
    [store, batchId, mutate, ofBatch, refusedOfBatch],
  );

  useEffect(() => {
    // The device's queue is a store outside React: read again when the user or the batch changes.
    // eslint-disable-next-line react-hooks/set-state-in-effect -- synchronising with that store is what effects are for
    setQueued(ofBatch());
    setRefused(refusedOfBatch());
    void flush();
    const onOnline = () => void flush();
    const w = typeof window !== 'undefined' && typeof window.addEventListener === 'function' ? window : null;
    w?.addEventListener('online', onOnline);
    const timer = setInterval(() => {
      if (store?.load().length) void flush();
    }, RETRY_MS);
    return () => {
      w?.removeEventListener('online', onOnline);
      clearInterval(timer);
    };
  }, [flush, store, ofBatch, refusedOfBatch]);

  const log = useCallback(
    async (r: { takenAt: string; c: number; note?: string }) => {
      if (!store) return 'queued' as const;
      const item: QueuedReading = {
        batchId,
        key: newReadingKey(),
        takenAt: r.takenAt,
        c: r.c,
        ...(r.note ? { note: r.note } : {}),
        queuedAt: new Date().toISOString(),
      };
      enqueue(store, item);
      setSentCount(0);
      setQueued(ofBatch());
      await flush(item.key);
      return store.load().some((x) => x.key === item.key) ? ('queued' as const) : ('sent' as const);
    },
    [store, batchId, flush, ofBatch],
  );

  const dismissRefused = useCallback(() => {
    if (!store) return;
    store.saveRefused(store.loadRefused().filter((r) => r.reading.batchId !== batchId));
    setRefused(refusedOfBatch());
  }, [store, batchId, refusedOfBatch]);

  return useMemo(
    () => ({ log, flush, queued, refused, sentCount, isOffline, dismissRefused }),
    [log, flush, queued, refused, sentCount, isOffline, dismissRefused],
  );
}
