import { monteCarlo, monteCarloSteps, type UncertaintyInput, type UncertaintyResult } from '../model/uncertainty';
import type { PlanInputs, PlanOutputs, UncertaintySettings } from '../contracts/plans';
import { parameterCovariance, type PlanContext } from './context';
import type { PlanEvaluation } from './evaluate';

export const DEFAULT_UNCERTAINTY: UncertaintySettings = { draws: 4000, seed: 1, sensorBiasSdC: 0.5, doseRelSd: 0.05 };

/** Candidate setpoints: an even grid over the vessel's range plus the recommended setpoint itself. */
export function candidateSetpoints(boundsC: [number, number], setpointC: number, n = 25): number[] {
  const [lo, hi] = boundsC;
  const grid = Array.from({ length: n }, (_, j) => (j === n - 1 ? hi : lo + ((hi - lo) * j) / (n - 1)));
  return grid.some((c) => Math.abs(c - setpointC) < 1e-9) ? grid : [...grid, setpointC].sort((a, b) => a - b);
}

export function uncertaintyInput(ctx: PlanContext, ev: PlanEvaluation, settings: UncertaintySettings, batchH: number): UncertaintyInput {
  return {
    enzyme: ev.enzyme,
    substrate: ev.substrate,
    batchH,
    boundsC: ev.boundsC,
    covariance: parameterCovariance(ctx).covariance,
    sensorBiasSdC: settings.sensorBiasSdC,
    // A calibration's catalytic scale is uncertain as a dose is: both scale Vmax log-normally, so their ln sds add in
    // quadrature (its correlation with kd and Ed is left out: an approximation, the posterior's marginal sds kept exactly).
    doseRelSd: Math.hypot(settings.doseRelSd, ctx.lnVmaxScaleSd),
    draws: settings.draws,
    seed: settings.seed,
    candidatesC: candidateSetpoints(ev.boundsC, ev.outputs.setpointC),
    robust: true,
  };
}

/** The stored summary: P10/P50/P90 at the recommended setpoint (held from the start) and the robust setpoint. */
export function summariseUncertainty(ctx: PlanContext, ev: PlanEvaluation, r: UncertaintyResult): NonNullable<PlanOutputs['uncertainty']> {
  const at = r.candidates.reduce((best, c) => (Math.abs(c.c - ev.outputs.setpointC) < Math.abs(best.c - ev.outputs.setpointC) ? c : best));
  return {
    draws: r.draws,
    seed: r.seed,
    parameterSpread: parameterCovariance(ctx).source,
    p10: at.p10,
    p50: at.p50,
    p90: at.p90,
    robustSetpointC: r.robust ? r.robust.setpointC : ev.outputs.setpointC,
    robustP10: r.robust ? r.robust.p10 : at.p10,
  };
}

/** Runs to completion (the server's way); the browser steps the same generator in chunks. */
export function runUncertainty(ctx: PlanContext, ev: PlanEvaluation, inputs: PlanInputs): PlanOutputs['uncertainty'] {
  if (!inputs.uncertainty) return null;
  return summariseUncertainty(ctx, ev, monteCarlo(uncertaintyInput(ctx, ev, inputs.uncertainty, inputs.batchH)));
}

export { monteCarloSteps };
