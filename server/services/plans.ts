import { writeTx, type Db } from '../../db/client';
import { MODEL_VERSION } from '../../src/model';
import { computePlanOutputs, planContext } from '../../src/planning';
import type { Plan, PlanInputs, PlanQuery } from '../../src/contracts/plans';
import type { SessionUser } from '../../src/contracts/session';
import { toCsv } from '../csv';
import { canonicalJson, sha256 } from '../digest';
import { assertFiniteResult } from '../finite';
import { HttpError, notFound } from '../http-error';
import { findSitePlan, insertPlan, listSitePlans, type PlanJoined } from '../repositories/plans';
import { findSiteEnzyme, findSiteRecipe } from '../repositories/recipes';
import { findSiteVessel } from '../repositories/vessels';
import type { Services } from '../context';
import { appendAudit } from './audit';
import { olderEvidence, planningLot } from './evidence';
import { acceptedLot } from './lots';

export const planContentHash = (p: Pick<Plan, 'inputs' | 'outputs' | 'modelVersion'>) =>
  sha256(canonicalJson({ inputs: p.inputs, outputs: p.outputs, modelVersion: p.modelVersion }));

const toPlan = async (db: Db, { plan: p, recipeName, lotCode, vesselName, createdBy }: PlanJoined): Promise<Plan> => ({
  id: p.id,
  recipeId: p.recipeId,
  recipeName,
  lotCode,
  vesselName,
  createdAt: p.createdAt,
  createdBy,
  modelVersion: p.modelVersion,
  contentHash: p.contentHash,
  inputs: p.inputs,
  outputs: p.outputs,
  olderEvidence: await olderEvidence(db, p.siteId, p),
});

export const listPlans = async ({ db }: Services, u: SessionUser, q: PlanQuery): Promise<Plan[]> =>
  Promise.all((await listSitePlans(db, u.siteId, q.recipeId)).map((j) => toPlan(db, j)));

export async function getPlan({ db }: Services, u: SessionUser, id: number): Promise<Plan> {
  const found = await findSitePlan(db, u.siteId, id);
  if (!found) throw notFound('Plan');
  return toPlan(db, found);
}

/** Recomputes the plan from stored records and the engineer's choices only, then stores it once. */
export async function createPlan({ db, clock }: Services, u: SessionUser, inputs: PlanInputs): Promise<Plan> {
  const found = await findSiteRecipe(db, u.siteId, inputs.recipeId);
  if (!found) throw notFound('Recipe');
  const { recipe } = found;
  const lot = await acceptedLot(db, u.siteId, inputs.lotId);
  if (lot.enzymeId !== recipe.enzymeId)
    throw new HttpError(400, 'invalid_input', 'The lot is of another enzyme', { lotId: `Choose a lot of ${found.enzymeName}` });
  const enzyme = (await findSiteEnzyme(db, u.siteId, recipe.enzymeId))!;
  const vessel = (await findSiteVessel(db, u.siteId, recipe.vesselId))!;
  const outputs = computePlanOutputs(planContext(recipe, enzyme, await planningLot(db, u.siteId, lot, recipe.id), vessel), inputs);
  assertFiniteResult(outputs, 'plan');
  const now = clock.now().toISOString();
  const contentHash = planContentHash({ inputs, outputs, modelVersion: MODEL_VERSION });
  return writeTx(db, async (tx) => {
    const row = await insertPlan(tx, {
      siteId: u.siteId,
      recipeId: recipe.id,
      lotId: lot.id,
      createdBy: u.id,
      createdAt: now,
      modelVersion: MODEL_VERSION,
      inputs,
      outputs,
      strategy: outputs.strategy,
      setpointC: outputs.setpointC,
      predictedProductGPerL: outputs.predictedProductGPerL,
      p10GPerL: outputs.uncertainty?.p10 ?? null,
      p50GPerL: outputs.uncertainty?.p50 ?? null,
      p90GPerL: outputs.uncertainty?.p90 ?? null,
      activityLeft: outputs.activityLeft,
      profitPerH: outputs.profitPerH,
      constraintsMet: outputs.constraintsMet,
      contentHash,
    });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'plan.create',
      entity: 'plan',
      entityId: row.id,
      newValue: {
        recipeId: recipe.id,
        lotId: lot.id,
        strategy: outputs.strategy,
        setpointC: outputs.setpointC,
        contentHash,
        modelVersion: MODEL_VERSION,
        evidence: outputs.kinetics.evidence?.text,
      },
      at: clock.now(),
    });
    return toPlan(tx, (await findSitePlan(tx, u.siteId, row.id))!);
  });
}

/** One plan as field/value rows: inputs, outputs, stages and the hash, safe to open in a spreadsheet. */
export async function planCsv(s: Services, u: SessionUser, id: number): Promise<{ filename: string; csv: string }> {
  const p = await getPlan(s, u, id);
  const o = p.outputs;
  const cur = u.siteCurrency;
  const rows: unknown[][] = [
    ['plan_id', p.id, ''],
    ['recipe', p.recipeName, ''],
    ['lot', p.lotCode, ''],
    ['vessel', p.vesselName, ''],
    ['created_at_utc', p.createdAt, ''],
    ['created_by', p.createdBy, ''],
    ['model_version', p.modelVersion, ''],
    ['content_hash', p.contentHash, 'sha256'],
    ...Object.entries(p.inputs)
      .filter(([k]) => k !== 'uncertainty')
      .map(([k, v]) => [
        `input.${k}`,
        v,
        k === 'productPricePerKg' || k === 'enzymePricePerKg' ? `${cur}/kg` : k === 'heatingCostPerDegCHour' ? `${cur}/(degC h)` : '',
      ]),
    ...(p.inputs.uncertainty ? Object.entries(p.inputs.uncertainty).map(([k, v]) => [`input.uncertainty.${k}`, v, '']) : []),
    ['strategy', o.strategy, ''],
    ['setpoint_c', o.setpointC, 'degC'],
    ...(o.stages ?? []).map((s, i) => [`stage_${i + 1}`, `${s.hours} h at ${s.c}`, 'h, degC']),
    ['predicted_product', o.predictedProductGPerL, 'g/L'],
    ['activity_left', o.activityLeft, 'fraction'],
    ['profit_per_h', o.profitPerH, `${cur}/h`],
    ['current_setpoint_c', o.current.setpointC, 'degC'],
    ['current_product', o.current.productGPerL, 'g/L'],
    ['gain_over_current', o.gainOverCurrent, 'fraction'],
    ['kinetics_evidence', o.kinetics.evidence?.text ?? o.kinetics.stabilitySource, ''],
    ['older_evidence', p.olderEvidence ?? '', ''],
    ['constraints_met', o.constraintsMet, ''],
    ['pressure_caution', o.cautions.crossesBoiling, `max ${o.cautions.maxC} degC`],
    ['below_hygienic_minimum', o.cautions.belowHygienicMin, `${o.cautions.hygienicMinC} degC`],
    ['p10', o.uncertainty?.p10 ?? null, 'g/L'],
    ['p50', o.uncertainty?.p50 ?? null, 'g/L'],
    ['p90', o.uncertainty?.p90 ?? null, 'g/L'],
    ['robust_setpoint_c', o.uncertainty?.robustSetpointC ?? null, 'degC'],
  ];
  return { filename: `plan-${p.id}.csv`, csv: toCsv(['field', 'value', 'unit'], rows) };
}
