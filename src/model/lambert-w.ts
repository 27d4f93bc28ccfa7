const INV_E = Math.exp(-1);

// Fritsch-Shafer-Crowley iteration for w + ln w = z: fourth order, so two steps usually reach rounding.
/** Wright omega: the real w with w + ln w = z, i.e. W0(e^z), without forming e^z (dimensionless). */
export function wrightOmega(z: number): number {
  if (z !== z) return NaN;
  // W0(x) = x - x^2 + ..., so e^z is exact to rounding once e^z < 2e-16.
  if (z < -36.1) return Math.exp(z);
  if (z === Infinity) return Infinity;
  if (z > 1e8) {
    // Asymptotic series; the next term is O((ln z)^3 / z^3), below rounding here.
    const l1 = Math.log(z);
    return z - l1 + l1 / z + (l1 * (l1 - 2)) / (2 * z * z);
  }
  let w: number;
  if (z < 1) {
    const l = Math.log1p(Math.exp(z));
    w = l * (1 - Math.log1p(l) / (2 + l));
  } else {
    const lz = Math.log(z);
    w = z - lz + lz / z;
  }
  for (let i = 0; i < 3; i++) {
    const r = z - w - Math.log(w);
    const wp1 = 1 + w;
    const t = wp1 * (wp1 + (2 / 3) * r);
    const next = w * (1 + ((r / wp1) * (t - 0.5 * r)) / (t - r));
    if (!(next > 0)) break;
    w = next;
    // Fourth-order convergence: after a residual this small the step just taken is exact to rounding.
    if (Math.abs(r) < 1e-5 * (1 + w)) break;
  }
  return w;
}

/** Principal branch W0(x) for real x >= -1/e (dimensionless); arguments a rounding below -1/e clamp to -1. */
export function lambertW0(x: number): number {
  if (x !== x) return NaN;
  if (x === 0) return 0;
  if (x > 0) return wrightOmega(Math.log(x));
  if (x <= -INV_E) return -1;
  const q = 1 + Math.E * x;
  // Series about the branch point; p > 0 on the principal branch.
  const p = Math.sqrt(2 * Math.max(q, 0));
  const w = x > -0.25 ? x * (1 - x + 1.5 * x * x) : -1 + p - (p * p) / 3 + (11 / 72) * p * p * p;
  return halley(w, x);
}

/** Lower branch W-1(x) for real -1/e <= x < 0 (dimensionless); the double nearest -1/e clamps to -1. */
export function lambertWm1(x: number): number {
  if (!(x < 0)) return NaN;
  if (x <= -INV_E) return -1;
  let w: number;
  if (x < -0.25) {
    const p = -Math.sqrt(2 * Math.max(1 + Math.E * x, 0));
    w = -1 + p - (p * p) / 3 + (11 / 72) * p * p * p;
  } else {
    const l1 = Math.log(-x);
    const l2 = Math.log(-l1);
    w = l1 - l2 + l2 / l1;
  }
  return halley(w, x);
}

function halley(w0: number, x: number): number {
  let w = w0;
  for (let i = 0; i < 20; i++) {
    const ew = Math.exp(w);
    const f = w * ew - x;
    const wp1 = w + 1;
    if (wp1 === 0) break;
    const step = f / (ew * wp1 - ((w + 2) * f) / (2 * wp1));
    if (!Number.isFinite(step)) break;
    w -= step;
    if (Math.abs(step) <= 1e-15 * (1 + Math.abs(w))) break;
  }
  return w;
}
