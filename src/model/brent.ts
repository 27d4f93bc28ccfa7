const GOLD = 0.3819660112501051;

/** Maximise f on [a, b] by Brent's method (golden section with parabolic steps); x tolerance absTol in x's unit. */
export function brentMax(f: (x: number) => number, a: number, b: number, absTol = 1e-9): { x: number; fx: number } {
  let lo = a;
  let hi = b;
  let x = lo + GOLD * (hi - lo);
  let w = x;
  let v = x;
  let fx = -f(x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  for (let iter = 0; iter < 200; iter++) {
    const m = 0.5 * (lo + hi);
    const tol1 = 1.4901161193847656e-8 * Math.abs(x) + absTol / 3;
    const tol2 = 2 * tol1;
    if (Math.abs(x - m) <= tol2 - 0.5 * (hi - lo)) break;
    let useGolden = true;
    if (Math.abs(e) > tol1) {
      const r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      else q = -q;
      const eOld = e;
      e = d;
      if (Math.abs(p) < Math.abs(0.5 * q * eOld) && p > q * (lo - x) && p < q * (hi - x)) {
        d = p / q;
        const u = x + d;
        if (u - lo < tol2 || hi - u < tol2) d = x < m ? tol1 : -tol1;
        useGolden = false;
      }
    }
    if (useGolden) {
      e = x < m ? hi - x : lo - x;
      d = GOLD * e;
    }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d > 0 ? tol1 : -tol1);
    const fu = -f(u);
    if (fu <= fx) {
      if (u < x) hi = x;
      else lo = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) lo = u;
      else hi = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  return { x, fx: -fx };
}

/** Maximise f on [lo, hi]: scan a grid of n points, then Brent around the best; endpoints are candidates too. */
export function scanMax(f: (x: number) => number, lo: number, hi: number, n: number, absTol = 1e-9): { x: number; fx: number } {
  if (!(hi > lo)) return { x: lo, fx: f(lo) };
  let bestI = 0;
  let bestF = -Infinity;
  const step = (hi - lo) / (n - 1);
  for (let i = 0; i < n; i++) {
    const fx = f(i === n - 1 ? hi : lo + i * step);
    if (fx > bestF) {
      bestF = fx;
      bestI = i;
    }
  }
  const xBest = bestI === n - 1 ? hi : lo + bestI * step;
  const a = Math.max(lo, xBest - step);
  const b = Math.min(hi, xBest + step);
  const res = brentMax(f, a, b, absTol);
  if (bestF > res.fx) return { x: xBest, fx: bestF };
  return res;
}
