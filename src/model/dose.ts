import { KELVIN_OFFSET } from './constants';
import { compileRates, lnKAt } from './kinetics';
import { integrateProgram, productFromWork, type WorkState } from './batch';
import type { BatchState, EnzymeParams, Reading, Substrate, TemperatureInput } from './types';

export interface DoseResult {
  /** Time at the reference temperature that inactivates as much as the log did, h. */
  equivalentHAtRef: number;
  refC: number;
  /** Batch time of the last reading, h (capped at batchH). */
  lastH: number;
  residualActivity: number;
  productGPerL: number;
  /** Product at batchH if the plan is followed from the last reading on, g/L. */
  forecastProductGPerL: number;
  forecastResidualActivity: number;
  /** State at the last reading, to continue from. */
  state: BatchState;
}

/** Thermal dose of a logged history (h, degC): equivalent hours at refC (default the enzyme's tRefC), activity and product so far, forecast under the plan. */
export function thermalDose(
  enzyme: EnzymeParams,
  substrate: Substrate,
  log: readonly Reading[],
  plan: TemperatureInput,
  batchH: number,
  refC?: number,
): DoseResult {
  const ref = refC ?? enzyme.tRefC;
  const r = compileRates(enzyme);
  const lastH = Math.min(batchH, log.length > 0 ? log[log.length - 1].h : 0);
  const st: WorkState = { x: 0, a: 1, kint: 0 };
  integrateProgram(r, { log }, 0, lastH, st);
  // Dose is a shape of temperature alone, so take it with unit kd at the reference (also when kdRef is 0).
  const unit = compileRates({ ...enzyme, kdRefPerH: 1, tRefC: ref });
  const kRef = Math.exp(lnKAt(unit, 1 / (ref + KELVIN_OFFSET)));
  const du: WorkState = { x: 0, a: 1, kint: 0 };
  integrateProgram(unit, { log }, 0, lastH, du);
  const now = { x: st.x, a: st.a };
  integrateProgram(r, plan, lastH, batchH, st);
  const { s0GPerL: s0, kmGPerL: km } = substrate;
  return {
    equivalentHAtRef: du.kint / kRef,
    refC: ref,
    lastH,
    residualActivity: now.a,
    productGPerL: productFromWork(now.x, s0, km),
    forecastProductGPerL: productFromWork(st.x, s0, km),
    forecastResidualActivity: st.a,
    state: { workGPerL: now.x, activity: now.a },
  };
}
