import { DEMO_USERS } from '../../db/seed';
import { inputsFromRecipe } from '../../src/planning/inputs';
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
export async function proposeDemoChange(ctx: ChangeControlCtx, siteId: number): Promise<void> {
  const engineerRow = await findUserByEmail(ctx.db, DEMO_USERS.find((u) => u.role === 'engineer')!.email);
  const engineer = engineerRow && (await loadSessionUser(ctx.db, engineerRow.id));
  const recipe = await findSiteRecipeByName(ctx.db, siteId, RECIPE);
  if (!engineer || !recipe) return;
  const plan = await createPlan(ctx, engineer, inputsFromRecipe(recipe));
  const o = plan.outputs;
  await proposeChange(ctx, engineer, {
    planId: plan.id,
    rationale: `The planner puts the best setpoint for a ${recipe.batchH} h batch on its lot at ${o.setpointC.toFixed(1)} °C instead of ${recipe.currentSetpointC.toFixed(1)} °C.`,
    expectedEffect: `About ${(o.gainOverCurrent * 100).toFixed(1)} % more product per batch (${o.current.productGPerL.toFixed(1)} to ${o.predictedProductGPerL.toFixed(1)} g/L).`,
    effectiveFrom: siteDay(ctx.clock.now(), engineer.siteTimeZone),
  });
}
