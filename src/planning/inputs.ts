import type { PlanInputs } from '../contracts/plans';
import type { Recipe } from '../contracts/recipes';

type RecipeFigures = Pick<
  Recipe,
  | 'id'
  | 'lotId'
  | 'batchH'
  | 'turnaroundH'
  | 'doseGPerL'
  | 's0GPerL'
  | 'kmGPerL'
  | 'productPricePerKg'
  | 'enzymePricePerKg'
  | 'heatingCostPerDegCHour'
  | 'currentSetpointC'
>;

/** The planner's starting point: the recipe as stored, held at one setpoint, no uncertainty run yet. */
export function inputsFromRecipe(r: RecipeFigures): PlanInputs {
  return {
    recipeId: r.id,
    lotId: r.lotId,
    batchH: r.batchH,
    turnaroundH: r.turnaroundH,
    doseGPerL: r.doseGPerL,
    s0GPerL: r.s0GPerL,
    kmGPerL: r.kmGPerL,
    productPricePerKg: r.productPricePerKg,
    enzymePricePerKg: r.enzymePricePerKg,
    heatingCostPerDegCHour: r.heatingCostPerDegCHour,
    currentSetpointC: r.currentSetpointC,
    strategy: 'isothermal',
    stages: 4,
    maxStepC: 4,
    uncertainty: null,
  };
}
