// The lot's assay fit (src/stability.ts): replicates are fitted as weighted rows, so a big replicated file gets the
// three-model comparison, and what is stored carries the models compared and the lack-of-fit sentence.
import { describe, expect, it } from 'vitest';
import { AssayFit } from '../../src/contracts/assays';
import { arrheniusFactor, createRng, fitInactivation, type InactivationPoint } from '../../src/model';
import { distinctRows, fitAssay } from '../../src/assay-fit';
import { MAX_FIT_ROWS } from '../../src/model/fit';

/** Invented assay: 4 temperatures x 6 hold times, `reps` readings each, 4 % multiplicative noise, 10 % lost in heat-up. */
function replicated(reps: number, seed: number): InactivationPoint[] {
  const rng = createRng(seed);
  const pts: InactivationPoint[] = [];
  for (let r = 0; r < reps; r++)
    for (const c of [50, 55, 60, 65])
      for (const h of [0.5, 1, 2, 4, 8, 16]) pts.push({ c, h, residual: 0.9 * Math.exp(-0.05 * arrheniusFactor(260, c, 55) * h + 0.04 * rng.normal()) });
  return pts;
}

describe('fitAssay', () => {
  it('25,000 replicated points (above the old 20,000-point cut-off) get all three models, equal to fitting every point', () => {
    const pts = replicated(1042, 9);
    expect(pts.length).toBeGreaterThan(25_000);
    expect(distinctRows(pts)).toBe(24);
    const r = fitAssay(55, pts);
    if (!r.fit) throw new Error(r.problem);
    expect(AssayFit.parse(r.fit)).toEqual(r.fit);
    expect(r.fit.models!.map((m) => m.name)).toEqual(['first-order', 'first-order-a0', 'two-fraction']);
    // The truth lost 10 % before time 0: with 25,000 points AICc picks the model with a free initial activity.
    expect(r.fit.chosen).toBe('first-order-a0');
    expect(r.fit.models![1].a0!).toBeCloseTo(0.9, 2);
    const every = fitInactivation(55, pts, { collapseReplicates: false });
    expect(r.fit.chosen).toBe(every.chosen);
    expect(r.fit.lackOfFit).toBe(every.lackOfFit);
    expect(Math.abs(r.fit.kdRefPerH / every.kdRefPerH - 1)).toBeLessThan(1e-8);
    expect(Math.abs(r.fit.edKJPerMol - every.edKJPerMol)).toBeLessThan(1e-6);
    for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) expect(Math.abs(r.fit.covariance[a][b] / every.covariance[a][b] - 1)).toBeLessThan(1e-7);
  });
  it('20,010 distinct rows (above the old first-order-only cut-off) get all three models', () => {
    const rng = createRng(3);
    const pts: InactivationPoint[] = Array.from({ length: 20_010 }, (_, i) => {
      const c = [50, 55, 60, 65][i % 4];
      const h = 0.5 + (16 * i) / 20_010;
      return { c, h, residual: Math.exp(-0.05 * arrheniusFactor(260, c, 55) * h + 0.04 * rng.normal()) };
    });
    expect(distinctRows(pts)).toBe(20_010);
    const r = fitAssay(55, pts);
    if (!r.fit) throw new Error(r.problem);
    expect(r.fit.models!.map((m) => m.name)).toEqual(['first-order', 'first-order-a0', 'two-fraction']);
    // First-order truth with 4 % noise: kd at 55 degC within a few per cent of 0.05 /h.
    expect(Math.abs(r.fit.kdRefPerH / 0.05 - 1)).toBeLessThan(0.02);
  });
  it('more distinct rows than the fit takes: a named problem, not a silent first-order fit', () => {
    const pts: InactivationPoint[] = Array.from({ length: MAX_FIT_ROWS + 1 }, (_, i) => ({
      c: 50 + (i % 4) * 5,
      h: 0.5 + i * 1e-4,
      residual: Math.exp(-0.01 * (0.5 + i * 1e-4) * (1 + (i % 4))),
    }));
    const r = fitAssay(55, pts);
    expect(r.fit).toBeNull();
    expect(r.problem).toBe(`The data has ${MAX_FIT_ROWS + 1} distinct (temperature, time) rows: at most ${MAX_FIT_ROWS} are fitted`);
  });
  it('a fit stored before the comparison (no chosen, models, lackOfFit) still reads', () => {
    const r = fitAssay(55, replicated(1, 2));
    if (!r.fit) throw new Error(r.problem);
    const { chosen: _c, models: _m, lackOfFit: _l, ...old } = r.fit;
    expect(AssayFit.parse(old)).toEqual(old);
  });
});
