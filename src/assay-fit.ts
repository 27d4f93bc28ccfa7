// A lot's QC assay fitted by the engine, in Yieldpoint's terms (the stored AssayFit). Runs where files are read
// (the server's import worker, the demo seed), apart from src/stability.ts so the web app does not carry the fit.
import type { AssayFit } from './contracts/assays';
import { ModelInputError } from './model/errors';
import { fitInactivation, type InactivationPoint } from './model/fit';

export type AssayFitResult = { fit: AssayFit; problem: null } | { fit: null; problem: string };

/**
 * The fit collapses replicates (same temperature and time) into weighted rows, so a file's size is its distinct
 * (temperature, time) rows, not its points. Every file gets all three models: an upload holds at most 100,000 data
 * rows, which is the fit's own limit of distinct rows (MAX_FIT_ROWS; 100,000 distinct rows took about 1.7 s of CPU
 * for the three models on the 2-core build machine under load).
 */
/** Distinct (temperature, time) rows of an assay: what the fit's cost grows with. */
export function distinctRows(points: readonly InactivationPoint[]): number {
  return new Set(points.map((p) => `${p.c}|${p.h}`)).size;
}

/** The engine's one-step fit of residual activity (fractions) at several temperatures, or why it cannot fit. */
export function fitAssay(tRefC: number, points: readonly InactivationPoint[]): AssayFitResult {
  try {
    const f = fitInactivation(tRefC, [...points]);
    const fit: AssayFit = {
      tRefC: f.tRefC,
      kdRefPerH: f.kdRefPerH,
      edKJPerMol: f.edKJPerMol,
      halfLifeRefH: f.halfLifeRefH,
      se: f.se,
      covariance: f.covariance,
      residualSd: f.residualSd,
      n: f.n,
      dof: f.dof,
      twoStep: f.twoStep,
      chosen: f.chosen,
      // A degenerate model's figures can overflow (a stable kd of e^800): such a model is left out of the table.
      models: f.models
        .filter((m) => [m.kdRefPerH, m.edKJPerMol, m.halfLifeRefH, m.a0 ?? 0, m.stableFraction?.kdRefPerH ?? 0].every(Number.isFinite))
        .map((m) => ({
          name: m.name,
          kdRefPerH: m.kdRefPerH,
          edKJPerMol: m.edKJPerMol,
          halfLifeRefH: m.halfLifeRefH,
          aicc: m.aicc,
          ...(m.a0 !== undefined ? { a0: m.a0 } : {}),
          ...(m.stableFraction ? { stableFraction: m.stableFraction } : {}),
          ...(m.singular ? { singular: m.singular } : {}),
        })),
      lackOfFit: f.lackOfFit,
    };
    return { fit, problem: null };
  } catch (e) {
    if (e instanceof ModelInputError) return { fit: null, problem: `The data ${e.rule}` };
    throw e;
  }
}
