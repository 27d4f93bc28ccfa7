import { lambertW0 as libW0 } from 'lambert-w-function';
import { describe, expect, it } from 'vitest';
import { createRng, lambertW0, wrightOmega } from '../../src/model';

describe('Lambert W', () => {
  it('W0 agrees with lambert-w-function on 2000 seeded arguments from 1e-12 to 1e12', () => {
    const rng = createRng(31);
    let worst = 0;
    for (let i = 0; i < 2000; i++) {
      const x = Math.pow(10, -12 + 24 * rng.uniform());
      worst = Math.max(worst, Math.abs(lambertW0(x) / libW0(x) - 1));
    }
    expect(worst).toBeLessThan(1e-13);
  });
  it('W0 on [-1/e, 0) satisfies w e^w = x and lies in [-1, 0)', () => {
    for (const x of [-0.3678794411714423, -0.36, -0.2, -1e-3, -1e-20]) {
      const w = lambertW0(x);
      expect(w).toBeGreaterThanOrEqual(-1);
      expect(w).toBeLessThan(0);
      expect(Math.abs(w * Math.exp(w) - x)).toBeLessThan(1e-15 + 1e-12 * Math.abs(x));
    }
  });
  it('the double nearest -1/e (below the branch point) clamps to -1 instead of NaN', () => {
    expect(lambertW0(-Math.exp(-1))).toBeCloseTo(-1, 7);
    expect(lambertW0(-0.36787944117144245)).toBe(-1);
  });
  it('Wright omega solves w + ln w = z over the whole real line without overflow', () => {
    for (const z of [-800, -40, -5, -0.5, 0, 0.5, 3, 50, 709, 1e4, 1e9, 1e200]) {
      const w = wrightOmega(z);
      expect(Number.isFinite(w)).toBe(true);
      if (z > -700) expect(Math.abs(w + Math.log(w) - z)).toBeLessThanOrEqual(4e-16 * Math.max(1, Math.abs(z)));
    }
  });
  it('Wright omega matches the library where e^z is representable', () => {
    for (const z of [-30, -3, 0, 1, 10, 100, 700]) expect(Math.abs(wrightOmega(z) / libW0(Math.exp(z)) - 1)).toBeLessThan(1e-13);
  });
});
