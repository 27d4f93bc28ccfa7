import { DEMO_USERS } from '../../db/seed';
import { findSiteRecipeByName } from '../repositories/recipes';
import { findUserByEmail } from '../repositories/users';
import { siteDay } from '../site-time';
import { loadSessionUser } from './auth';
import { proposeChange, type ChangeControlCtx } from './change-requests';
import { createPlan } from './plans';

const RECIPE = 'Lactose-free milk base';

/**
 * The demo's waiting sign-off: the engineer proposes the planner's own setpoint for the lactose recipe, through the
 * same services as the app (plan recomputed and hashed, audit events, supervisor mail), so a supervisor has a real
 * request to review and e-sign on first sign-in.
 */
export function proposeDemoChange(ctx: ChangeControlCtx, siteId: number): void {
  const engineerRow = findUserByEmail(ctx.db, DEMO_USERS.find((u) => u.role === 'engineer')!.email);
  const engineer = engineerRow && loadSessionUser(ctx.db, engineerRow.id);
  const recipe = findSiteRecipeByName(ctx.db, siteId, RECIPE);
  if (!engineer || !recipe) return;
  const plan = createPlan(ctx, engineer, {
    recipeId: recipe.id,
    lotId: recipe.lotId,
    batchH: recipe.batchH,
    turnaroundH: recipe.turnaroundH,
    doseGPerL: recipe.doseGPerL,
    s0GPerL: recipe.s0GPerL,
    kmGPerL: recipe.kmGPerL,
    productPricePerKg: recipe.productPricePerKg,
    enzymePricePerKg: recipe.enzymePricePerKg,
    heatingCostPerDegCHour: recipe.heatingCostPerDegCHour,
    currentSetpointC: recipe.currentSetpointC,
    strategy: 'isothermal',
    stages: 4,
    maxStepC: 4,
    uncertainty: null,
  });
  const o = plan.outputs;
  proposeChange(ctx, engineer, {
    planId: plan.id,
    rationale: `The planner puts the best setpoint for a ${recipe.batchH} h batch on its lot at ${o.setpointC.toFixed(1)} °C instead of ${recipe.currentSetpointC.toFixed(1)} °C.`,
    expectedEffect: `About ${(o.gainOverCurrent * 100).toFixed(1)} % more product per batch (${o.current.productGPerL.toFixed(1)} to ${o.predictedProductGPerL.toFixed(1)} g/L).`,
    effectiveFrom: siteDay(ctx.clock.now(), engineer.siteTimeZone),
  });
}
