import { describe, expect, it } from 'vitest';
import { ApiError } from '../../src/api/client';
import { deviceStore, enqueue, flushQueue, newReadingKey, type QueuedReading, type QueueStore } from '../../src/api/reading-queue';

// No localStorage under vitest's node environment: deviceStore keeps each user's lists in memory.
function memoryStore(userId = 1): QueueStore & { readonly items: QueuedReading[] } {
  const s = deviceStore(userId);
  return Object.defineProperty(s, 'items', { get: () => s.load() }) as QueueStore & { readonly items: QueuedReading[] };
}
const reading = (key: string, c = 50): QueuedReading => ({ batchId: 1, key, takenAt: '2026-12-01T08:00:00Z', c, queuedAt: '2026-12-01T08:00:01Z' });

describe('reading queue', () => {
  it('makes distinct keys the server accepts', () => {
    const keys = new Set(Array.from({ length: 1000 }, newReadingKey));
    expect(keys.size).toBe(1000);
    for (const k of keys) expect(k).toMatch(/^[A-Za-z0-9_.:-]{8,80}$/);
  });

  it('queues a reading once per key', () => {
    const s = memoryStore();
    enqueue(s, reading('k-00000001'));
    enqueue(s, reading('k-00000001'));
    expect(s.items).toHaveLength(1);
  });

  it('keeps everything while offline and sends in order when the network returns', async () => {
    const s = memoryStore();
    enqueue(s, reading('k-00000001', 50));
    enqueue(s, reading('k-00000002', 51));
    const offline = await flushQueue(s, async () => {
      throw new ApiError(0, 'network', 'offline');
    });
    expect(offline).toMatchObject({ isOffline: true, sent: [] });
    expect(s.items.map((r) => r.key)).toEqual(['k-00000001', 'k-00000002']);
    const seen: string[] = [];
    const online = await flushQueue(s, async (r) => seen.push(r.key));
    expect(seen).toEqual(['k-00000001', 'k-00000002']);
    expect(online.sent).toHaveLength(2);
    expect(s.items).toEqual([]);
  });

  it('drops and reports a reading the server refuses, and goes on with the next', async () => {
    const s = memoryStore();
    enqueue(s, reading('k-00000001', 300));
    enqueue(s, reading('k-00000002', 50));
    const r = await flushQueue(s, async (x) => {
      if (x.c > 250) throw new ApiError(400, 'invalid_input', 'out of range');
    });
    expect(r.rejected.map((x) => [x.reading.key, x.error.status])).toEqual([['k-00000001', 400]]);
    expect(r.sent.map((x) => x.key)).toEqual(['k-00000002']);
    expect(s.items).toEqual([]);
    // Kept with the server's reason until dismissed, never silently dropped.
    expect(s.loadRefused()).toEqual([{ reading: reading('k-00000001', 300), code: 'invalid_input', message: 'out of range' }]);
  });

  it("keeps each user's queue apart", () => {
    const a = memoryStore(1);
    const b = memoryStore(2);
    enqueue(a, reading('k-00000001'));
    expect(b.items).toEqual([]);
    expect(a.items).toHaveLength(1);
  });

  it('stops at a server failure and keeps the rest', async () => {
    const s = memoryStore();
    enqueue(s, reading('k-00000001'));
    enqueue(s, reading('k-00000002'));
    const r = await flushQueue(s, async () => {
      throw new ApiError(503, 'http', 'busy');
    });
    expect(r.isOffline).toBe(false);
    expect(s.items).toHaveLength(2);
  });
});
