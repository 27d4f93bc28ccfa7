// Large assays: all three models above 2,000 distinct rows (the starts race on a subset, the best is fitted to
// every row), and a clear refusal past MAX_FIT_ROWS.
import { describe, expect, it } from 'vitest';
import { arrheniusFactor, createRng, fitInactivation, type InactivationPoint } from '../../src/model';
import { MAX_FIT_ROWS } from '../../src/model/fit';

describe('fit of many distinct rows', () => {
  it('8,000 rows of invented two-fraction decay: two fractions chosen, every parameter within 4 se of the truth', () => {
    const rng = createRng(17);
    const pts: InactivationPoint[] = [];
    for (let i = 0; i < 8000; i++) {
      const c = [50, 55, 60, 65][i % 4];
      const h = 0.1 + (24 * i) / 8000;
      const m = 0.7 * Math.exp(-0.4 * arrheniusFactor(280, c, 55) * h) + 0.3 * Math.exp(-0.02 * arrheniusFactor(240, c, 55) * h);
      pts.push({ c, h, residual: m * Math.exp(0.02 * rng.normal()) });
    }
    const f = fitInactivation(55, pts);
    expect(f.models.map((m) => m.name)).toEqual(['first-order', 'first-order-a0', 'two-fraction']);
    expect(f.chosen).toBe('two-fraction');
    const tf = f.models[2];
    expect(Math.abs(tf.kdRefPerH - 0.4)).toBeLessThan(4 * tf.se.kdRefPerH);
    expect(Math.abs(tf.edKJPerMol - 280)).toBeLessThan(4 * tf.se.edKJPerMol);
    expect(Math.abs(tf.stableFraction!.share - 0.3)).toBeLessThan(4 * tf.se.share);
    expect(Math.abs(tf.stableFraction!.kdRefPerH - 0.02)).toBeLessThan(4 * tf.se.stableKdRefPerH);
    expect(Math.abs(tf.stableFraction!.edKJPerMol - 240)).toBeLessThan(4 * tf.se.stableEdKJPerMol);
  });
  it(`more than ${MAX_FIT_ROWS} distinct rows is refused, naming the count and the limit`, () => {
    const pts: InactivationPoint[] = Array.from({ length: MAX_FIT_ROWS + 5 }, (_, i) => ({ c: 50 + (i % 2) * 10, h: 0.5 + i * 1e-4, residual: 0.9 }));
    expect(() => fitInactivation(55, pts)).toThrow(`points: has ${MAX_FIT_ROWS + 5} distinct (temperature, time) rows: at most ${MAX_FIT_ROWS} are fitted`);
  });
});
