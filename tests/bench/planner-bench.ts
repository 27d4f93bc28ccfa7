// Time of one planner recompute (the work a field change triggers before drawing) on the demo recipes.
// Run: npx tsx tests/bench/planner-bench.ts. The goal (under 50 ms per redraw, drawing included) is checked
// in the browser by tests/e2e/planner.test.ts, which prints its figures; this isolates the model's share.
import { migrateDb, openDb } from '../../db/client';
import { seedDemo } from '../../db/seed';
import { findSiteEnzyme, findSiteLot, listSiteRecipes } from '../../server/repositories/recipes';
import { findSiteVessel } from '../../server/repositories/vessels';
import { planningLot } from '../../server/services/evidence';
import { evaluatePlan, inputsFromRecipe, planContext, planReasons, planSeries } from '../../src/planning';

async function main() {
  const db = openDb(':memory:');
  await migrateDb(db);
  const { siteId } = await seedDemo(db, { bcryptCost: 4 });
  const N = 40;
  for (const { recipe } of await listSiteRecipes(db, siteId)) {
    const ctx = planContext(
      recipe,
      (await findSiteEnzyme(db, siteId, recipe.enzymeId))!,
      await planningLot(db, siteId, (await findSiteLot(db, siteId, recipe.lotId))!, recipe.id),
      (await findSiteVessel(db, siteId, recipe.vesselId))!,
    );
    const base = inputsFromRecipe(recipe);
    const times: number[] = [];
    for (let i = 0; i < N; i++) {
      // Each run a slightly different batch length, as a stepper press would give.
      const inputs = { ...base, batchH: base.batchH * (1 + (i % 5) * 0.05), strategy: i % 2 ? ('staged' as const) : ('isothermal' as const) };
      const t0 = performance.now();
      const ev = evaluatePlan(ctx, inputs);
      planReasons(ev.outputs, planSeries(ev, inputs), inputs.batchH, inputs.turnaroundH);
      times.push(performance.now() - t0);
    }
    const warm = times.slice(5).sort((a, b) => a - b);
    const q = (p: number) => warm[Math.min(warm.length - 1, Math.floor(p * warm.length))]!.toFixed(1);
    console.log(`${recipe.name.padEnd(34)} first ${times[0]!.toFixed(1)} ms, median ${q(0.5)} ms, p90 ${q(0.9)} ms (${N} runs)`);
  }
}

void main();
