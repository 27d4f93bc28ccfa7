import { describe, expect, it } from 'vitest';
import { sampleIndices } from '../../src/batches';
import { createRng } from '../../src/model/random';

// Min-max decimation (each bucket's lowest and highest point kept) is the usual way to thin a time series for a
// chart without losing its peaks: common practice, no source.
describe('sampleIndices', () => {
  it('keeps every reading of a short record', () => {
    expect(sampleIndices([1, 2, 3], 10)).toEqual([0, 1, 2]);
  });

  it('keeps the first reading, the latest ones and every bucket extreme, within the limit, in order', () => {
    const rng = createRng(7);
    for (const n of [5001, 12_345, 300_000]) {
      const values = Float64Array.from({ length: n }, () => 50 + rng.uniform());
      const spike = Math.floor(n / 3);
      values[spike] = 95;
      values[spike + 7] = 5;
      const idx = sampleIndices(values, 5000, 50);
      expect(idx.length).toBeLessThanOrEqual(5000);
      expect(idx[0]).toBe(0);
      expect(idx.slice(-50)).toEqual(Array.from({ length: 50 }, (_, i) => n - 50 + i));
      for (let i = 1; i < idx.length; i++) expect(idx[i]).toBeGreaterThan(idx[i - 1]!);
      expect(idx).toContain(spike);
      expect(idx).toContain(spike + 7);
      // The sample's range is the record's range.
      const kept = idx.map((i) => values[i]!);
      expect(Math.max(...kept)).toBe(95);
      expect(Math.min(...kept)).toBe(5);
    }
  });

  it('refuses a limit too small to hold a bucket', () => {
    expect(() => sampleIndices([1, 2, 3, 4], 2)).toThrow(RangeError);
  });
});
