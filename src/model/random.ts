/** Seeded generator of uniform doubles in [0, 1) and standard normals; same seed, same sequence. */
export interface Rng {
  uniform(): number;
  normal(): number;
}

/** xoshiro128** seeded through splitmix32, 53-bit uniforms, Box-Muller normals (both of each pair used). */
export function createRng(seed: number): Rng {
  let x = (Math.floor(seed) >>> 0) ^ 0x9e3779b9;
  const split = () => {
    x = (x + 0x9e3779b9) | 0;
    let z = x;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
    return (z ^ (z >>> 16)) >>> 0;
  };
  let s0 = split();
  let s1 = split();
  let s2 = split();
  let s3 = split();
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1;
  const next = () => {
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = rotl(s3, 11);
    return result;
  };
  const uniform = () => ((next() >>> 5) * 67108864 + (next() >>> 6)) / 9007199254740992;
  let spare = 0;
  let hasSpare = false;
  const normal = () => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    let u = 0;
    while (u === 0) u = uniform();
    const v = uniform();
    const rad = Math.sqrt(-2 * Math.log(u));
    spare = rad * Math.sin(2 * Math.PI * v);
    hasSpare = true;
    return rad * Math.cos(2 * Math.PI * v);
  };
  return { uniform, normal };
}

function rotl(v: number, k: number): number {
  return (v << k) | (v >>> (32 - k));
}

/** Lower Cholesky factor of a symmetric positive semi-definite matrix; null when it is not (within rounding). */
export function cholesky(a: number[][]): number[][] | null {
  const n = a.length;
  const l: number[][] = a.map(() => new Array(n).fill(0));
  for (let j = 0; j < n; j++) {
    let d = a[j][j];
    for (let k = 0; k < j; k++) d -= l[j][k] * l[j][k];
    const tol = 1e-12 * Math.abs(a[j][j]);
    if (d < -tol - 1e-300) return null;
    const ljj = d > tol ? Math.sqrt(d) : 0;
    l[j][j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i][j];
      for (let k = 0; k < j; k++) s -= l[i][k] * l[j][k];
      if (ljj === 0) {
        // A zero pivot is allowed only if the column is zero too (semi-definite).
        if (Math.abs(s) > 1e-9 * Math.sqrt(Math.abs(a[i][i] * a[j][j])) + 1e-300) return null;
        l[i][j] = 0;
      } else l[i][j] = s / ljj;
    }
  }
  return l;
}

/** Quantile p (0..1) of ascending-sorted values, linear between order statistics (type 7). */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const i = Math.floor(h);
  if (i >= n - 1) return sorted[n - 1];
  return sorted[i] + (h - i) * (sorted[i + 1] - sorted[i]);
}

// Hoare-partition quickselect: after the call a[k] holds the k-th smallest of a[lo..hi].
function selectInPlace(a: Float64Array, k: number, lo: number, hi: number): void {
  while (hi > lo) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}

const SAMPLE = 256;
const sample = new Float64Array(SAMPLE);

/**
 * The k-th smallest (0-based) of values and, when `pair`, the (k+1)-th too (or the k-th again at the end), exact.
 * Large arrays (Floyd & Rivest's idea, CACM 18, 1975, cited from memory): a strided sample of 256 values brackets
 * the rank with a margin of about three sampling sd; one pass counts the values below the bracket and gathers
 * those inside into `scratch`, and only they are selected. Whenever the rank falls outside the bracket (an
 * unlucky sample, NaN) the whole array is selected instead, so the answer is the same order statistic either way.
 */
export function selectRank(values: ArrayLike<number>, k: number, pair: boolean, scratch: Float64Array): [number, number] {
  const n = values.length;
  if (n >= 4 * SAMPLE) {
    for (let j = 0; j < SAMPLE; j++) sample[j] = values[Math.floor((j * n) / SAMPLE)];
    sample.sort();
    const pos = ((k + 0.5) / n) * SAMPLE;
    const g = 3 * Math.sqrt(SAMPLE * (pos / SAMPLE) * (1 - pos / SAMPLE)) + 3;
    const jLo = Math.floor(pos - g);
    const jHi = Math.ceil(pos + g);
    const lo = jLo < 0 ? -Infinity : sample[jLo];
    const hi = jHi >= SAMPLE ? Infinity : sample[jHi];
    let below = 0;
    let above = 0;
    let m = 0;
    for (let i = 0; i < n; i++) {
      const v = values[i];
      if (v < lo) below++;
      else if (v > hi) above++;
      else if (v <= hi) scratch[m++] = v;
    }
    const kk = k - below;
    if (below + above + m === n && kk >= 0 && kk < m && (!pair || kk + 1 < m || k + 1 >= n)) {
      selectInPlace(scratch, kk, 0, m - 1);
      const first = scratch[kk];
      let second = first;
      if (pair && k + 1 < n) {
        second = Infinity;
        for (let j = kk + 1; j < m; j++) if (scratch[j] < second) second = scratch[j];
      }
      return [first, second];
    }
  }
  for (let i = 0; i < n; i++) scratch[i] = values[i];
  selectInPlace(scratch, k, 0, n - 1);
  const first = scratch[k];
  let second = first;
  if (pair && k + 1 < n) {
    second = Infinity;
    for (let j = k + 1; j < n; j++) if (scratch[j] < second) second = scratch[j];
  }
  return [first, second];
}

/** The k-th smallest (0-based) of values; reorders `scratch`. */
export function kthSmallest(values: ArrayLike<number>, k: number, scratch: Float64Array): number {
  return selectRank(values, k, false, scratch)[0];
}

/**
 * Type-7 p-quantile of map(values) over n values of which only the first m of `band` need be known: nBelow others
 * are known to lie below, and the rest above, the two order statistics it takes. Same arithmetic as
 * quantilesBySelection on all n, so the same number; reorders band[0..m-1].
 */
export function quantileFromBand(band: Float64Array, m: number, nBelow: number, n: number, p: number, map: (x: number) => number): number {
  const h = (n - 1) * p;
  return interpolatedAt(band, Math.floor(h) - nBelow, 0, m, h, n, map);
}

// Type-7 interpolation at h = (n - 1) p: the k-th smallest of a[lo..end-1] (selected in place) and the smallest above it.
function interpolatedAt(a: Float64Array, k: number, lo: number, end: number, h: number, n: number, map: (x: number) => number): number {
  const i = Math.floor(h);
  selectInPlace(a, k, lo, end - 1);
  const first = map(a[k]);
  let second = first;
  if (i < n - 1 && h > i) {
    let next = Infinity;
    for (let j = k + 1; j < end; j++) if (a[j] < next) next = a[j];
    second = map(next);
  }
  return first + (h - i) * (second - first);
}

/** Type-7 quantiles of map(values) for ascending ps (0..1), by selection (selectRank); map must be increasing; reorders `scratch`. */
export function quantilesBySelection(values: ArrayLike<number>, ps: number[], scratch: Float64Array, map: (x: number) => number = (x) => x): number[] {
  const n = values.length;
  return ps.map((p) => {
    const h = (n - 1) * p;
    const i = Math.floor(h);
    const [a, b] = selectRank(values, i, i < n - 1 && h > i, scratch);
    const first = map(a);
    const second = i < n - 1 && h > i ? map(b) : first;
    return first + (h - i) * (second - first);
  });
}
