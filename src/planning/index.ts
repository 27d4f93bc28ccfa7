// Planning: the recipe-level use of src/model, shared by the planner screen and the server's recompute.
// Imports only src/model and src/contracts, so both sides run the same code on the same inputs.
export * from './context';
export * from './evidence';
export * from './evaluate';
export * from './early-finish';
export * from './uncertainty';
export * from './series';
export * from './reasons';
export * from './inputs';

import type { PlanInputs, PlanOutputs } from '../contracts/plans';
import type { PlanContext } from './context';
import { evaluatePlan } from './evaluate';
import { runUncertainty } from './uncertainty';

/** All outputs of a plan, the Monte Carlo included when asked for. */
export function computePlanOutputs(ctx: PlanContext, inputs: PlanInputs): PlanOutputs {
  const ev = evaluatePlan(ctx, inputs);
  return { ...ev.outputs, uncertainty: runUncertainty(ctx, ev, inputs) };
}
