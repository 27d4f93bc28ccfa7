/** ln Gamma(x) for x > 0 by the Lanczos approximation (g = 7, 9 terms), about 1e-15 relative. */
export function lnGamma(x: number): number {
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905, -0.13857109526572012,
    9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - lnGamma(1 - x);
  const xx = x - 1;
  let a = c[0];
  const t = xx + 7.5;
  for (let i = 1; i < 9; i++) a += c[i] / (xx + i);
  return 0.5 * Math.log(2 * Math.PI) + (xx + 0.5) * Math.log(t) - t + Math.log(a);
}

// Continued fraction for the incomplete beta (modified Lentz).
function betaCf(a: number, b: number, x: number): number {
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 1000; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-15) break;
  }
  return h;
}

/** Regularised incomplete beta I_x(a, b) (dimensionless). */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const lnFront = lnGamma(a + b) - lnGamma(a) - lnGamma(b) + a * Math.log(x) + b * Math.log1p(-x);
  if (x < (a + 1) / (a + b + 2)) return (Math.exp(lnFront) * betaCf(a, b, x)) / a;
  return 1 - (Math.exp(lnFront) * betaCf(b, a, 1 - x)) / b;
}

/** Student-t cumulative distribution at t with dof degrees of freedom. */
export function studentTCdf(t: number, dof: number): number {
  const x = dof / (dof + t * t);
  const tail = 0.5 * incompleteBeta(x, dof / 2, 0.5);
  return t > 0 ? 1 - tail : tail;
}

/** Student-t quantile for probability p (0..1) and dof > 0 degrees of freedom, by bisection then Newton. */
export function studentTQuantile(p: number, dof: number): number {
  if (p === 0.5) return 0;
  if (p < 0.5) return -studentTQuantile(1 - p, dof);
  let lo = 0;
  let hi = 1;
  while (studentTCdf(hi, dof) < p) hi *= 2;
  for (let i = 0; i < 60; i++) {
    const mid = 0.5 * (lo + hi);
    if (studentTCdf(mid, dof) < p) lo = mid;
    else hi = mid;
    if (hi - lo < 1e-6 * hi) break;
  }
  let t = 0.5 * (lo + hi);
  const lnC = lnGamma((dof + 1) / 2) - lnGamma(dof / 2) - 0.5 * Math.log(dof * Math.PI);
  for (let i = 0; i < 5; i++) {
    const pdf = Math.exp(lnC - ((dof + 1) / 2) * Math.log1p((t * t) / dof));
    const step = (studentTCdf(t, dof) - p) / pdf;
    t -= step;
    if (Math.abs(step) < 1e-14 * Math.abs(t)) break;
  }
  return t;
}

/** Invert a small symmetric positive definite matrix by Gauss-Jordan; null when singular. */
export function invertSymmetric(a: number[][]): number[][] | null {
  const n = a.length;
  const m = a.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(a[i][i]));
  for (let col = 0; col < n; col++) {
    let piv = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(m[r][col]) > Math.abs(m[piv][col])) piv = r;
    if (!(Math.abs(m[piv][col]) > 1e-13 * scale)) return null;
    [m[col], m[piv]] = [m[piv], m[col]];
    const d = m[col][col];
    for (let j = 0; j < 2 * n; j++) m[col][j] /= d;
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const f = m[r][col];
      if (f !== 0) for (let j = 0; j < 2 * n; j++) m[r][j] -= f * m[col][j];
    }
  }
  return m.map((row) => row.slice(n));
}
