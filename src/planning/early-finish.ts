import { economics, type EconomicsParams } from '../model/economics';
import { simulate } from '../model/batch';
import type { EnzymeParams, Reading, Substrate } from '../model/types';

/**
 * Conversion counted as complete: product within 0.1 % of the substrate load. A stated choice (common practice
 * for an end-point, no source): beyond it a longer batch or another setpoint changes the product by too little to
 * measure with a 2 % lab assay.
 */
export const COMPLETE_CONVERSION = 0.999;

/** Hour (h) at which a batch run on `log` reaches complete conversion, or null when it does not by batchH. */
export function conversionCompleteAtH(enzyme: EnzymeParams, substrate: Substrate, batchH: number, log: readonly Reading[]): number | null {
  const target = COMPLETE_CONVERSION * substrate.s0GPerL;
  const at = (h: number) => simulate(enzyme, substrate, h, { log }).productGPerL;
  if (at(batchH) < target) return null;
  // Product only grows with time, so bisection brackets the first hour at the target; 40 halvings of a 500 h
  // batch leave well under a second.
  let [lo, hi] = [0, batchH];
  for (let i = 0; i < 40; i++) {
    const mid = (lo + hi) / 2;
    if (at(mid) >= target) hi = mid;
    else lo = mid;
  }
  return hi;
}

/** What the planner says when the substrate is used up before the batch ends. */
export type EarlyFinish = {
  /** Hour at which the recommended program completes conversion. */
  completeAtH: number;
  /** The same at the current setpoint; null when it does not complete by the end. */
  currentCompleteAtH: number | null;
  /** Profit per reactor hour of a batch ended at completeAtH, turnaround included, and of the full batch. */
  shorterProfitPerH: number;
  fullProfitPerH: number;
};

/** The early finish of a program on `log`, or null when conversion is not complete by batchH. */
export function earlyFinish(
  enzyme: EnzymeParams,
  substrate: Substrate,
  batchH: number,
  log: readonly Reading[],
  currentLog: readonly Reading[],
  econ: EconomicsParams,
): EarlyFinish | null {
  const completeAtH = conversionCompleteAtH(enzyme, substrate, batchH, log);
  if (completeAtH === null) return null;
  return {
    completeAtH,
    currentCompleteAtH: conversionCompleteAtH(enzyme, substrate, batchH, currentLog),
    shorterProfitPerH: economics(enzyme, substrate, completeAtH, { log }, econ).profitPerH,
    fullProfitPerH: economics(enzyme, substrate, batchH, { log }, econ).profitPerH,
  };
}
