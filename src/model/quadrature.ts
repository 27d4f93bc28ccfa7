/** Gauss-Legendre rule on [0, 1] with the spectral integration matrix q (q[i*n+j] = integral from 0 to s_i of the j-th Lagrange basis). */
export interface QuadRule {
  n: number;
  s: Float64Array;
  w: Float64Array;
  q: Float64Array;
}

/** Gauss-Legendre nodes and weights on [0, 1] by Newton on the Legendre polynomial (dimensionless). */
export function gaussLegendre(n: number): { s: Float64Array; w: Float64Array } {
  const s = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let x = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1;
      let p1 = x;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      const pn = n === 1 ? x : p1;
      const pm = n === 1 ? 1 : p0;
      dp = (n * (x * pn - pm)) / (x * x - 1);
      const dx = pn / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-16) break;
    }
    s[n - 1 - i] = 0.5 * (1 + x);
    w[n - 1 - i] = 1 / ((1 - x * x) * dp * dp);
  }
  return { s, w };
}

function lagrange(s: Float64Array, j: number, x: number): number {
  let p = 1;
  for (let m = 0; m < s.length; m++) if (m !== j) p *= (x - s[m]) / (s[j] - s[m]);
  return p;
}

/** Build a rule with its integration matrix; the inner rule is exact because each basis has degree n-1. */
export function quadRule(n: number): QuadRule {
  const { s, w } = gaussLegendre(n);
  const q = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let acc = 0;
      for (let m = 0; m < n; m++) acc += w[m] * lagrange(s, j, s[i] * s[m]);
      q[i * n + j] = s[i] * acc;
    }
  }
  return { n, s, w, q };
}

/** Gauss-Hermite rule for the standard normal density (probabilists' He_n): nodes and weights summing to 1; exact to degree 2n - 1. */
export function gaussHermite(n: number): { x: Float64Array; w: Float64Array } {
  // He_{j+1} = x He_j - j He_{j-1}; returns [He_n(x), He_{n-1}(x)].
  const he = (x: number): [number, number] => {
    let p0 = 1;
    let p1 = x;
    if (n === 0) return [1, 0];
    for (let j = 1; j < n; j++) {
      const p2 = x * p1 - j * p0;
      p0 = p1;
      p1 = p2;
    }
    return [p1, p0];
  };
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  let fact = 1;
  for (let j = 2; j <= n; j++) fact *= j;
  // Roots lie within +-2 sqrt(n): bracket sign changes on a fine scan, then bisect to rounding.
  const lim = 2 * Math.sqrt(n) + 1;
  const step = 1e-3;
  let found = 0;
  let a = -lim;
  let fa = he(a)[0];
  for (let b = -lim + step; found < n && b <= lim + step; b += step) {
    const fb = he(b)[0];
    if (fa === 0 || fa * fb < 0) {
      let lo = a;
      let hi = b;
      for (let it = 0; it < 200 && hi - lo > 1e-15 * (1 + Math.abs(lo)); it++) {
        const mid = 0.5 * (lo + hi);
        if (he(lo)[0] * he(mid)[0] <= 0) hi = mid;
        else lo = mid;
      }
      const r = 0.5 * (lo + hi);
      x[found] = r;
      w[found] = fact / (n * n * he(r)[1] ** 2);
      found++;
    }
    a = b;
    fa = fb;
  }
  return { x, w };
}
