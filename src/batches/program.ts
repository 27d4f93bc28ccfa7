import { simulate } from '../model/batch';
import { stagesWithRamps } from '../model/optimise';
import type { Stage } from '../model/types';
import type { BatchProgram } from '../contracts/batches';
import type { Enzyme } from '../contracts/enzymes';
import type { Plan } from '../contracts/plans';
import type { Recipe } from '../contracts/recipes';
import type { Vessel } from '../contracts/vessels';
import { enzymeFor, planContext, type EvidenceLot } from '../planning';

type ProgramInputs = {
  recipe: Pick<Recipe, 'batchH' | 'currentSetpointC' | 'doseGPerL' | 'vmaxRefGPerLH' | 'edKJPerMol' | 'fillC' | 's0GPerL' | 'kmGPerL'>;
  enzyme: Pick<Enzyme, 'tRefC' | 'eaKJPerMol'>;
  lot: EvidenceLot;
  vessel: Pick<Vessel, 'minC' | 'maxC' | 'maxHeatCPerH' | 'maxCoolCPerH' | 'hygienicMinC' | 'workingVolumeL'>;
  /** The recipe's released plan, if change control has released one. */
  plan: Pick<Plan, 'id' | 'inputs' | 'outputs'> | null;
};

/**
 * What a batch is run against: the released plan's setpoint or staged profile (its dose, substrate and batch
 * length), else the recipe's current setpoint; with this batch's lot and vessel.
 */
export function batchProgram({ recipe, enzyme, lot, vessel, plan }: ProgramInputs): BatchProgram {
  const ctx = planContext(recipe, enzyme, lot, vessel);
  const batchH = plan ? plan.inputs.batchH : recipe.batchH;
  const dose = plan ? plan.inputs.doseGPerL : recipe.doseGPerL;
  const substrate = plan ? { s0GPerL: plan.inputs.s0GPerL, kmGPerL: plan.inputs.kmGPerL } : { s0GPerL: recipe.s0GPerL, kmGPerL: recipe.kmGPerL };
  const stages: Stage[] = plan ? (plan.outputs.stages ?? [{ hours: batchH, c: plan.outputs.setpointC }]) : [{ hours: batchH, c: recipe.currentSetpointC }];
  const log = stagesWithRamps(stages, recipe.fillC, vessel.maxHeatCPerH, vessel.maxCoolCPerH);
  const e = enzymeFor(ctx, dose);
  const enzymeParams = { tRefC: e.tRefC, vmaxRef: e.vmaxRef, eaKJPerMol: e.eaKJPerMol, kdRefPerH: e.kdRefPerH, edKJPerMol: e.edKJPerMol };
  return {
    source: plan ? 'released_plan' : 'current_setpoint',
    planId: plan ? plan.id : null,
    batchH,
    stages: stages.map((s) => ({ hours: s.hours, c: s.c })),
    log: log.map((p) => ({ h: p.h, c: p.c })),
    fillC: recipe.fillC,
    enzyme: enzymeParams,
    substrate,
    plannedProductGPerL: simulate(enzymeParams, substrate, batchH, { log }).productGPerL,
    p10GPerL: plan?.outputs.uncertainty?.p10 ?? null,
    vessel: { minC: vessel.minC, maxC: vessel.maxC, hygienicMinC: vessel.hygienicMinC },
    evidence: ctx.evidence,
  };
}

/** Hours from the batch start to an instant (both ISO). */
export const batchHours = (startedAt: string, at: string) => (Date.parse(at) - Date.parse(startedAt)) / 3_600_000;
