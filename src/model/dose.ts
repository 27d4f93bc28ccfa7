import { KELVIN_OFFSET } from './constants';
import { compileRates, lnKAt } from './kinetics';
import { integrateProgram, productFromWork, startState, type WorkState } from './batch';
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
  /** Two fractions only: equivalent hours at refC under the stable fraction's own Ed. */
  stableEquivalentHAtRef?: number;
  /** Two fractions only: the stable fraction's part of residualActivity and of forecastResidualActivity. */
  stableActivity?: number;
  forecastStableActivity?: number;
}

// Dose is a shape of temperature alone, so take it with unit kd at the reference (also when kdRef is 0).
function equivalentHours(enzyme: EnzymeParams, edKJPerMol: number, log: readonly Reading[], lastH: number, ref: number): number {
  const unit = compileRates({ ...enzyme, stableFraction: undefined, edKJPerMol, kdRefPerH: 1, tRefC: ref });
  const kRef = Math.exp(lnKAt(unit, 1 / (ref + KELVIN_OFFSET)));
  const du: WorkState = { x: 0, a: 1, b: 0, kint: 0 };
  integrateProgram(unit, { log }, 0, lastH, du);
  return du.kint / kRef;
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
  const st = startState(r);
  integrateProgram(r, { log }, 0, lastH, st);
  const now = { x: st.x, a: st.a, b: st.b };
  integrateProgram(r, plan, lastH, batchH, st);
  const out: DoseResult = {
    equivalentHAtRef: equivalentHours(enzyme, enzyme.edKJPerMol, log, lastH, ref),
    refC: ref,
    lastH,
    residualActivity: now.a + now.b,
    productGPerL: productFromWork(Math.min(now.x, Number.MAX_VALUE), substrate),
    forecastProductGPerL: productFromWork(Math.min(st.x, Number.MAX_VALUE), substrate),
    forecastResidualActivity: st.a + st.b,
    state: { workGPerL: Math.min(now.x, Number.MAX_VALUE), activity: now.a + now.b },
  };
  const sf = enzyme.stableFraction;
  if (sf) {
    out.stableEquivalentHAtRef = equivalentHours(enzyme, sf.edKJPerMol, log, lastH, ref);
    out.stableActivity = now.b;
    out.forecastStableActivity = st.b;
    out.state.stableActivity = now.b;
  }
  return out;
}
