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
