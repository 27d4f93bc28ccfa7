import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import { keys } from '../api/keys';
import { deviceStore, enqueue, flushQueue, newReadingKey, type QueuedReading } from '../api/reading-queue';
import type { ReadingResult } from '../contracts/batches';

// One store for the app: the queue outlives the screen that filled it.
const store = deviceStore();
const RETRY_MS = 15_000;

/**
 * Logs readings through the device queue: each is saved on the device first, then sent; unsent ones are retried
 * when the network returns and every 15 s. Returns this batch's unsent readings for the preview.
 */
export function useLogReading(batchId: number) {
  const { mutate } = useSWRConfig();
  const [queued, setQueued] = useState<QueuedReading[]>(() => store.load().filter((r) => r.batchId === batchId));
  const [rejected, setRejected] = useState<{ reading: QueuedReading; error: ApiError }[]>([]);
  const [isOffline, setOffline] = useState(false);
  const busy = useRef(false);

  const flush = useCallback(async () => {
    if (busy.current) return;
    busy.current = true;
    try {
      const r = await flushQueue(store, (x) => api<ReadingResult>(`/batches/${x.batchId}/readings`, { method: 'POST', body: { key: x.key, takenAt: x.takenAt, c: x.c, ...(x.note ? { note: x.note } : {}) } }));
      setOffline(r.isOffline);
      if (r.rejected.length) setRejected((prev) => [...prev, ...r.rejected]);
      if (r.sent.length || r.rejected.length) await mutate((k) => typeof k === 'string' && k.startsWith(keys.batches));
    } finally {
      busy.current = false;
      setQueued(store.load().filter((x) => x.batchId === batchId));
    }
  }, [batchId, mutate]);

  useEffect(() => {
    void flush();
    const onOnline = () => void flush();
    const w = typeof window !== 'undefined' && typeof window.addEventListener === 'function' ? window : null;
    w?.addEventListener('online', onOnline);
    const timer = setInterval(() => {
      if (store.load().length) void flush();
    }, RETRY_MS);
    return () => {
      w?.removeEventListener('online', onOnline);
      clearInterval(timer);
    };
  }, [flush]);

  const log = useCallback(
    async (r: { takenAt: string; c: number; note?: string }) => {
      const item: QueuedReading = { batchId, key: newReadingKey(), takenAt: r.takenAt, c: r.c, ...(r.note ? { note: r.note } : {}), queuedAt: new Date().toISOString() };
      enqueue(store, item);
      setQueued(store.load().filter((x) => x.batchId === batchId));
      await flush();
      return store.load().some((x) => x.key === item.key) ? ('queued' as const) : ('sent' as const);
    },
    [batchId, flush],
  );

  return useMemo(
    () => ({ log, flush, queued, rejected, isOffline, dismissRejected: () => setRejected([]) }),
    [log, flush, queued, rejected, isOffline],
  );
}
