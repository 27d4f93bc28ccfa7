// Closed batches as evidence: the posterior of the lot's stability and the recipe's catalytic scale from each
// batch's measured product and logged temperatures, with the model-quality figures engineers and supervisors see.
import { calibrate, type CalibrationBatch } from '../model/calibrate';
import { halfLifeFromKd } from '../model/units';
import type { EnzymeParams } from '../model/types';
import type { BatchProgram } from '../contracts/batches';
import type { CalibrationBatchResult, CalibrationLeftOut, CalibrationPosterior, CalibrationResult, DriftPoint, ForecastError } from '../contracts/calibrations';
import type { Enzyme } from '../contracts/enzymes';
import type { Recipe } from '../contracts/recipes';
import { assayKinetics, VMAX_SCALE_LN_SD, type EvidenceLot } from '../planning';
import { batchHours } from './program';

// Sd of a measured product: 2 % of the value (1 sd). Common practice for an HPLC or refractometer product assay,
// no source; the site may learn better from its own replicate measurements.
export const MEASUREMENT_REL_SD = 0.02;

/** A closed batch as the server stores it. */
export type ClosedBatch = {
  batchId: number;
  startedAt: string;
  closedAt: string;
  program: BatchProgram;
  measuredProductGPerL: number | null;
  readings: readonly { takenAt: string; c: number }[];
};

/** A closed batch's stored row and readings as calibration takes them. */
export const closedBatch = (
  b: { id: number; startedAt: string; closedAt: string | null; program: BatchProgram; measuredProductGPerL: number | null },
  readings: ClosedBatch['readings'],
): ClosedBatch => ({
  batchId: b.id,
  startedAt: b.startedAt,
  closedAt: b.closedAt!,
  program: b.program,
  measuredProductGPerL: b.measuredProductGPerL,
  readings,
});

const Z95 = 1.959963984540054;
const rel = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));

/** The recipe's Vmax at this batch's dose before any calibration's scale (a program frozen under one carries it). */
const vmaxAtScaleOne = (p: BatchProgram) => p.enzyme.vmaxRef / (p.evidence?.vmaxScale ?? 1);

function errorOf(pairs: readonly [number, number][]): ForecastError {
  if (pairs.length === 0) return { biasGPerL: 0, rmseGPerL: 0 };
  const d = pairs.map(([forecast, measured]) => forecast - measured);
  return { biasGPerL: d.reduce((s, x) => s + x, 0) / d.length, rmseGPerL: Math.sqrt(d.reduce((s, x) => s + x * x, 0) / d.length) };
}

function driftPoint(batchCount: number, p: CalibrationPosterior): DriftPoint {
  const sd = (i: number) => Math.sqrt(Math.max(p.covariance[i][i], 0));
  return {
    batchCount,
    halfLifeRefH: halfLifeFromKd(p.kdRefPerH),
    halfLifeLowH: halfLifeFromKd(p.kdRefPerH * Math.exp(Z95 * sd(0))),
    halfLifeHighH: halfLifeFromKd(p.kdRefPerH * Math.exp(-Z95 * sd(0))),
    edKJPerMol: p.edKJPerMol,
    edLow: p.edKJPerMol - Z95 * sd(1),
    edHigh: p.edKJPerMol + Z95 * sd(1),
    vmaxScale: p.vmaxScale,
    vmaxScaleLow: p.vmaxScale * Math.exp(-Z95 * sd(2)),
    vmaxScaleHigh: p.vmaxScale * Math.exp(Z95 * sd(2)),
  };
}

/**
 * The proposed calibration of a recipe and lot from its closed batches (in closing order), or null when no batch
 * can be used. The prior is the lot's assay evidence (never an earlier calibration, so no batch counts twice);
 * batches the engineer left out, and those without a measured product, logged temperatures or of another dose
 * or substrate than the newest, are listed with the reason.
 */
export function proposeCalibration(args: {
  recipe: Pick<Recipe, 'edKJPerMol'>;
  enzyme: Pick<Enzyme, 'tRefC' | 'eaKJPerMol'>;
  lot: EvidenceLot;
  batches: readonly ClosedBatch[];
  excluded: readonly CalibrationLeftOut[];
  measurementRelSd?: number;
}): { result: CalibrationResult; batchIds: number[] } | null {
  const relSd = args.measurementRelSd ?? MEASUREMENT_REL_SD;
  const sorted = [...args.batches].sort((a, b) => a.closedAt.localeCompare(b.closedAt) || a.batchId - b.batchId);
  const leftOut: CalibrationLeftOut[] = [];
  const candidates: ClosedBatch[] = [];
  for (const b of sorted) {
    const ex = args.excluded.find((e) => e.batchId === b.batchId);
    if (ex) leftOut.push(ex);
    else if (b.measuredProductGPerL === null) leftOut.push({ batchId: b.batchId, reason: 'closed without a measured product', by: null, at: null });
    else if (b.readings.length < 2) leftOut.push({ batchId: b.batchId, reason: 'fewer than two logged temperatures', by: null, at: null });
    else candidates.push(b);
  }
  const newest = candidates.at(-1);
  if (!newest) return null;
  const used = candidates.filter((b) => {
    const same =
      rel(vmaxAtScaleOne(b.program), vmaxAtScaleOne(newest.program)) &&
      rel(b.program.substrate.s0GPerL, newest.program.substrate.s0GPerL) &&
      rel(b.program.substrate.kmGPerL, newest.program.substrate.kmGPerL);
    if (!same) leftOut.push({ batchId: b.batchId, reason: 'another dose or substrate than the newest batch', by: null, at: null });
    return same;
  });

  const prior = assayKinetics(args.recipe, args.enzyme.tRefC, args.lot);
  const priorCov = [
    [prior.covariance[0][0], prior.covariance[0][1], 0],
    [prior.covariance[1][0], prior.covariance[1][1], 0],
    [0, 0, VMAX_SCALE_LN_SD ** 2],
  ];
  const enzyme: EnzymeParams = {
    tRefC: args.enzyme.tRefC,
    vmaxRef: vmaxAtScaleOne(newest.program),
    eaKJPerMol: args.enzyme.eaKJPerMol,
    kdRefPerH: prior.kdRefPerH,
    edKJPerMol: prior.edKJPerMol,
  };
  const substrate = newest.program.substrate;
  const evidence: CalibrationBatch[] = used.map((b) => ({
    batchH: batchHours(b.startedAt, b.closedAt),
    temperature: { log: b.readings.map((r) => ({ h: batchHours(b.startedAt, r.takenAt), c: r.c })) },
    measuredProductGPerL: b.measuredProductGPerL!,
    measurementSdGPerL: Math.max(relSd * b.measuredProductGPerL!, 1e-6),
  }));
  const run = (k: number) => calibrate({ enzyme, substrate, covariance: priorCov, batches: evidence.slice(0, k) });
  const all = run(evidence.length);
  const batches: CalibrationBatchResult[] = all.batches.map((r, i) => ({
    batchId: used[i].batchId,
    closedAt: used[i].closedAt,
    measuredProductGPerL: evidence[i].measuredProductGPerL,
    measurementSdGPerL: evidence[i].measurementSdGPerL,
    priorForecastGPerL: r.priorForecastGPerL,
    priorSdGPerL: r.priorSdGPerL,
    posteriorForecastGPerL: r.posteriorForecastGPerL,
    leaveOneOutForecastGPerL: r.leaveOneOutForecastGPerL,
    leaveOneOutSdGPerL: r.leaveOneOutSdGPerL,
    standardisedResidual: r.standardisedResidual,
    isOutlier: r.outlier,
  }));
  const priorPosterior: CalibrationPosterior = { kdRefPerH: prior.kdRefPerH, edKJPerMol: prior.edKJPerMol, vmaxScale: 1, covariance: priorCov };
  const drift = [driftPoint(0, priorPosterior)];
  for (let k = 1; k < evidence.length; k++) drift.push(driftPoint(k, run(k).posterior));
  drift.push(driftPoint(evidence.length, all.posterior));
  return {
    batchIds: used.map((b) => b.batchId),
    result: {
      prior: { ...priorPosterior, text: prior.text, fitAssayId: prior.source === 'fit' ? args.lot.fit!.assayId : null },
      posterior: all.posterior,
      measurementRelSd: relSd,
      batches,
      before: errorOf(batches.map((b) => [b.priorForecastGPerL, b.measuredProductGPerL])),
      after: errorOf(batches.map((b) => [b.leaveOneOutForecastGPerL, b.measuredProductGPerL])),
      drift,
      leftOut,
    },
  };
}
