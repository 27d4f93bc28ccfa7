// A long record for a phone: which readings to send so the chart keeps its shape. Pure and index-based, so the
// server can choose before it loads whole rows.

/**
 * Indices (ascending) of at most `max` of `n` readings: the first and last of the record, the latest `keepLatest`,
 * and from each of the equal-width buckets before them the lowest and the highest value (min-max decimation),
 * so an excursion of one reading is never sampled away. All indices when `n <= max`.
 */
export function sampleIndices(values: ArrayLike<number>, max: number, keepLatest = 50): number[] {
  const n = values.length;
  if (max < 3) throw new RangeError('A sample keeps at least 3 readings');
  if (n <= max) return Array.from({ length: n }, (_, i) => i);
  const latest = Math.min(keepLatest, max - 3);
  const tail = n - latest;
  const buckets = Math.max(1, Math.floor((max - latest - 1) / 2));
  const out: number[] = [0];
  for (let k = 0; k < buckets; k++) {
    const from = Math.floor((k * tail) / buckets);
    const to = Math.floor(((k + 1) * tail) / buckets);
    if (to <= from) continue;
    let lo = from;
    let hi = from;
    for (let i = from + 1; i < to; i++) {
      if (values[i]! < values[lo]!) lo = i;
      if (values[i]! > values[hi]!) hi = i;
    }
    for (const i of lo === hi ? [lo] : [Math.min(lo, hi), Math.max(lo, hi)]) if (i !== 0) out.push(i);
  }
  for (let i = tail; i < n; i++) out.push(i);
  return out;
}
