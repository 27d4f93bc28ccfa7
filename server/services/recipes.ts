import { writeTx, type Db } from '../../db/client';
import type { Recipe, RecipeDetail, RecipeInput, RecipePatch } from '../../src/contracts/recipes';
import type { SessionUser } from '../../src/contracts/session';
import { HttpError, notFound } from '../http-error';
import { findSiteEnzyme, findSiteRecipe, findSiteRecipeByName, insertRecipe, listAcceptedLots, listSiteRecipes, updateRecipe } from '../repositories/recipes';
import { listApprovedChanges } from '../repositories/change-requests';
import { findSiteVessel, type VesselRow } from '../repositories/vessels';
import { siteDay } from '../site-time';
import type { Services } from '../context';
import { appendAudit } from './audit';
import { planningLot } from './evidence';
import { acceptedLot } from './lots';

type Joined = NonNullable<Awaited<ReturnType<typeof findSiteRecipe>>>;

const toRecipe = ({ recipe: { siteId: _s, createdAt: _c, ...r }, enzymeName, lotCode, vesselName }: Joined): Recipe => ({
  ...r,
  enzymeName,
  lotCode,
  vesselName,
});

export const listRecipes = async ({ db }: Services, u: SessionUser): Promise<Recipe[]> => (await listSiteRecipes(db, u.siteId)).map(toRecipe);

async function siteVessel(db: Db, siteId: number, vesselId: number): Promise<VesselRow> {
  const v = await findSiteVessel(db, siteId, vesselId);
  if (!v) throw new HttpError(400, 'invalid_input', 'No such vessel at this site', { vesselId: 'No such vessel at this site' });
  return v;
}

function checkSetpoint(v: VesselRow, c: number) {
  if (c < v.minC || c > v.maxC)
    throw new HttpError(400, 'invalid_input', `The current setpoint must lie within ${v.name}'s range`, {
      currentSetpointC: `Must lie between ${v.minC} and ${v.maxC} °C`,
    });
}

async function assertNameFree(db: Db, siteId: number, name: string, exceptId?: number) {
  const clash = await findSiteRecipeByName(db, siteId, name);
  if (clash && clash.id !== exceptId) throw new HttpError(409, 'name_taken', 'A recipe with this name exists', { name: 'A recipe with this name exists' });
}

export async function getRecipeDetail({ db }: Services, u: SessionUser, id: number): Promise<RecipeDetail> {
  const found = await findSiteRecipe(db, u.siteId, id);
  if (!found) throw notFound('Recipe');
  const vessel = (await findSiteVessel(db, u.siteId, found.recipe.vesselId))!;
  const { siteId: _s, createdAt: _c, ...enzyme } = (await findSiteEnzyme(db, u.siteId, found.recipe.enzymeId))!;
  const { siteId: _vs, createdAt: _vc, ...vesselOut } = vessel;
  return {
    recipe: toRecipe(found),
    vessel: vesselOut,
    enzyme,
    lots: await Promise.all((await listAcceptedLots(db, u.siteId, found.recipe.enzymeId)).map((l) => planningLot(db, u.siteId, l, id))),
  };
}

export async function createRecipe({ db, clock }: Services, u: SessionUser, input: RecipeInput): Promise<Recipe> {
  const lot = await acceptedLot(db, u.siteId, input.lotId);
  checkSetpoint(await siteVessel(db, u.siteId, input.vesselId), input.currentSetpointC);
  await assertNameFree(db, u.siteId, input.name);
  const now = clock.now();
  return writeTx(db, async (tx) => {
    const row = await insertRecipe(tx, u.siteId, { ...input, enzymeId: lot.enzymeId, updatedAt: now.toISOString() });
    const out = toRecipe((await findSiteRecipe(tx, u.siteId, row.id))!);
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'recipe.create',
      entity: 'recipe',
      entityId: row.id,
      newValue: input,
      at: now,
    });
    return out;
  });
}

/** A partial change; a new lot must be accepted and of the same enzyme, and a new vessel must fit the setpoint. */
export async function changeRecipe({ db, clock }: Services, u: SessionUser, id: number, patch: RecipePatch): Promise<Recipe> {
  const found = await findSiteRecipe(db, u.siteId, id);
  if (!found) throw notFound('Recipe');
  const before = found.recipe;
  if (patch.lotId !== undefined && patch.lotId !== before.lotId) {
    const lot = await acceptedLot(db, u.siteId, patch.lotId);
    if (lot.enzymeId !== before.enzymeId)
      throw new HttpError(400, 'invalid_input', 'The lot is of another enzyme', { lotId: `Choose a lot of ${found.enzymeName}` });
  }
  const vessel = await siteVessel(db, u.siteId, patch.vesselId ?? before.vesselId);
  if (patch.vesselId !== undefined) checkSetpoint(vessel, before.currentSetpointC);
  if (patch.name !== undefined) await assertNameFree(db, u.siteId, patch.name, id);
  const now = clock.now();
  return writeTx(db, async (tx) => {
    await updateRecipe(tx, id, { ...patch, updatedAt: now.toISOString() });
    const after = toRecipe((await findSiteRecipe(tx, u.siteId, id))!);
    const old = Object.fromEntries(Object.keys(patch).map((k) => [k, before[k as keyof typeof before]]));
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'recipe.update',
      entity: 'recipe',
      entityId: id,
      oldValue: old,
      newValue: patch,
      at: now,
    });
    return after;
  });
}

/**
 * What a batch starting at `at` runs. The recipe's released plan once its effective date (`releasedAt`, the start
 * of a site-local day) has come; before that, of the earlier approved changes already in effect the one decided
 * last, else what the first approval replaced (the previous released plan, or the bare setpoint).
 */
export async function releaseInEffect(db: Db, recipe: Joined['recipe'], at: Date, timeZone: string): Promise<{ planId: number | null; setpointC: number }> {
  if (!recipe.releasedPlanId || !recipe.releasedAt || Date.parse(recipe.releasedAt) <= at.getTime())
    return { planId: recipe.releasedPlanId, setpointC: recipe.currentSetpointC };
  const approvals = await listApprovedChanges(db, recipe.siteId, recipe.id);
  const day = siteDay(at, timeZone);
  const due = approvals.filter((a) => a.effectiveFrom <= day).at(-1);
  if (due) return { planId: due.planId, setpointC: due.setpointC };
  const before = approvals[0]?.replaced;
  return before ? { planId: before.planId, setpointC: before.setpointC } : { planId: null, setpointC: recipe.currentSetpointC };
}
