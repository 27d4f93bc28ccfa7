import bcrypt from 'bcryptjs';
import { writeTx, type Db } from '../../db/client';
import type {
  ChangeRequestDetail,
  ChangeRequestInput,
  ChangeRequestQuery,
  ChangeRequestSummary,
  SetpointSide,
  Signature,
  SignatureInput,
} from '../../src/contracts/change-requests';
import type { SessionUser } from '../../src/contracts/session';
import { toCsv } from '../csv';
import { canonicalJson, sha256 } from '../digest';
import { HttpError, notFound } from '../http-error';
import {
  decideChangeRequest,
  findSiteChangeRequest,
  insertChangeRequest,
  insertSignature,
  listActiveSupervisors,
  listSignatures,
  listSiteChangeRequests,
  listWaitingForRecipe,
  type ChangeRequestJoined,
  type ChangeRequestRow,
  type SignatureRow,
} from '../repositories/change-requests';
import { findSitePlan, type PlanRow } from '../repositories/plans';
import { findSiteRecipe, updateRecipe, type RecipeRow } from '../repositories/recipes';
import { findSite } from '../repositories/sites';
import { findSiteUser } from '../repositories/users';
import type { AppContext, Services } from '../context';
import { formatSiteTime, siteDay, startOfSiteDay } from '../site-time';
import { appendAudit } from './audit';
import { enqueueMail } from './mail';
import { getPlan } from './plans';

export type ChangeControlCtx = Pick<AppContext, 'db' | 'clock' | 'mail' | 'linkUrl'>;

/**
 * What every signature is bound to: the plan's full stored content and the request's own fields. Recomputed
 * from the rows at signing, so an edit to either after submission no longer matches the submitted hash.
 */
export function recordHash(
  plan: PlanRow,
  req: Pick<ChangeRequestRow, 'planId' | 'recipeId' | 'proposedBy' | 'rationale' | 'expectedEffect' | 'effectiveFrom'>,
): string {
  const content = {
    plan: { id: plan.id, recipeId: plan.recipeId, lotId: plan.lotId, modelVersion: plan.modelVersion, inputs: plan.inputs, outputs: plan.outputs },
    request: {
      planId: req.planId,
      recipeId: req.recipeId,
      proposedBy: req.proposedBy,
      rationale: req.rationale,
      expectedEffect: req.expectedEffect,
      effectiveFrom: req.effectiveFrom,
    },
  };
  return sha256(canonicalJson(content));
}

const siteTimeZone = async (db: Db, siteId: number) => (await findSite(db, siteId))?.timeZone ?? 'UTC';

function planSide(p: PlanRow, source: SetpointSide['source']): SetpointSide {
  return {
    source,
    planId: p.id,
    strategy: p.strategy,
    setpointC: p.setpointC,
    stages: p.outputs.stages,
    predictedProductGPerL: p.predictedProductGPerL,
    p10GPerL: p.p10GPerL,
    p50GPerL: p.p50GPerL,
    p90GPerL: p.p90GPerL,
    activityLeft: p.activityLeft,
    profitPerH: p.profitPerH,
    constraintsMet: p.constraintsMet,
  };
}

/** The recipe's setpoint now: its released plan, else its bare setpoint with the figures the proposed plan computed for it. */
async function currentSide(db: Db, siteId: number, recipe: RecipeRow, proposed: PlanRow): Promise<SetpointSide> {
  const released = recipe.releasedPlanId ? (await findSitePlan(db, siteId, recipe.releasedPlanId))?.plan : undefined;
  if (released) return planSide(released, 'released-plan');
  const c = proposed.outputs.current;
  const same = c.setpointC === recipe.currentSetpointC;
  return {
    source: 'recipe-setpoint',
    planId: null,
    strategy: 'isothermal',
    setpointC: recipe.currentSetpointC,
    stages: null,
    predictedProductGPerL: same ? c.productGPerL : null,
    p10GPerL: null,
    p50GPerL: null,
    p90GPerL: null,
    activityLeft: same ? c.activityLeft : null,
    profitPerH: same ? c.profitPerH : null,
    constraintsMet: null,
  };
}

const toSummary = ({ request: r, recipeName, vesselName, proposedBy, proposedSetpointC }: ChangeRequestJoined): ChangeRequestSummary => ({
  id: r.id,
  recipeId: r.recipeId,
  recipeName,
  vesselName,
  planId: r.planId,
  proposedById: r.proposedBy,
  proposedBy,
  rationale: r.rationale,
  expectedEffect: r.expectedEffect,
  effectiveFrom: r.effectiveFrom,
  status: r.status,
  recordHash: r.recordHash,
  createdAt: r.createdAt,
  decidedAt: r.decidedAt,
  supersededBy: r.supersededBy,
  proposedSetpointC,
});

const toSignature = (s: SignatureRow): Signature => ({
  id: s.id,
  printedName: s.printedName,
  role: s.role,
  meaning: s.meaning,
  comment: s.comment,
  signedAtUtc: s.signedAt,
  signedAtSite: formatSiteTime(s.signedAt, s.siteTimeZone),
  siteTimeZone: s.siteTimeZone,
  recordHash: s.recordHash,
});

export const listChangeRequests = async ({ db }: Services, u: SessionUser, q: ChangeRequestQuery): Promise<ChangeRequestSummary[]> =>
  (await listSiteChangeRequests(db, u.siteId, q.status)).map(toSummary);

async function load(db: Db, u: SessionUser, id: number) {
  const found = await findSiteChangeRequest(db, u.siteId, id);
  if (!found) throw notFound('Change request');
  const plan = (await findSitePlan(db, u.siteId, found.request.planId))!.plan;
  const recipe = (await findSiteRecipe(db, u.siteId, found.request.recipeId))!.recipe;
  return { found, plan, recipe };
}

export async function getChangeRequest(s: Services, u: SessionUser, id: number): Promise<ChangeRequestDetail> {
  const { found, plan, recipe } = await load(s.db, u, id);
  const r = found.request;
  return {
    ...toSummary(found),
    siteTimeZone: await siteTimeZone(s.db, u.siteId),
    isIntact: recordHash(plan, r) === r.recordHash,
    current: r.replaced ?? (await currentSide(s.db, u.siteId, recipe, plan)),
    proposed: planSide(plan, 'proposed-plan'),
    plan: await getPlan(s, u, plan.id),
    signatures: (await listSignatures(s.db, r.id)).map(toSignature),
  };
}

/**
 * Closes the recipe's other waiting requests unsigned, each audited: `superseded` by a newer proposal, `stale` once
 * another was released. Each keeps the comparison it showed, so its record still reads as it did.
 */
async function closeOthers(tx: Db, u: SessionUser, recipe: RecipeRow, byId: number, status: 'superseded' | 'stale', now: Date): Promise<void> {
  for (const other of await listWaitingForRecipe(tx, u.siteId, recipe.id, byId)) {
    const plan = (await findSitePlan(tx, u.siteId, other.planId))!.plan;
    await decideChangeRequest(tx, other.id, status, now.toISOString(), await currentSide(tx, u.siteId, recipe, plan), byId);
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: status === 'superseded' ? 'change-request.supersede' : 'change-request.stale',
      entity: 'change-request',
      entityId: other.id,
      oldValue: { status: 'proposed' },
      newValue: { status, supersededBy: byId },
      at: now,
    });
  }
}

const link = (ctx: ChangeControlCtx, id: number) => `${ctx.linkUrl.replace(/\/$/, '')}/sign-offs/${id}`;

export async function proposeChange(ctx: ChangeControlCtx, u: SessionUser, input: ChangeRequestInput): Promise<ChangeRequestDetail> {
  const { db, clock } = ctx;
  const planFound = await findSitePlan(db, u.siteId, input.planId);
  if (!planFound) throw new HttpError(400, 'invalid_input', 'No such plan at this site', { planId: 'No such plan at this site' });
  const { plan } = planFound;
  const now = clock.now();
  const tz = await siteTimeZone(db, u.siteId);
  if (input.effectiveFrom < siteDay(now, tz))
    throw new HttpError(400, 'invalid_input', 'The change cannot take effect in the past', { effectiveFrom: `Choose ${siteDay(now, tz)} or later` });
  if ((await listSiteChangeRequests(db, u.siteId, 'proposed')).some((c) => c.request.planId === plan.id))
    throw new HttpError(409, 'already_proposed', 'This plan is already waiting for sign-off');
  const recipe = (await findSiteRecipe(db, u.siteId, plan.recipeId))!.recipe;
  const fields = {
    planId: plan.id,
    recipeId: plan.recipeId,
    proposedBy: u.id,
    rationale: input.rationale,
    expectedEffect: input.expectedEffect,
    effectiveFrom: input.effectiveFrom,
  };
  const hash = recordHash(plan, fields);
  const id = await writeTx(db, async (tx) => {
    const row = await insertChangeRequest(tx, { ...fields, siteId: u.siteId, status: 'proposed', recordHash: hash, createdAt: now.toISOString() });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'change-request.create',
      entity: 'change-request',
      entityId: row.id,
      oldValue: { recipeId: recipe.id, setpointC: recipe.currentSetpointC, releasedPlanId: recipe.releasedPlanId },
      newValue: { ...fields, setpointC: plan.setpointC, strategy: plan.strategy, recordHash: hash },
      at: now,
    });
    // One request per recipe waits at a time: the newest, with the rationale written against what runs now.
    await closeOthers(tx, u, recipe, row.id, 'superseded', now);
    for (const sup of await listActiveSupervisors(tx, u.siteId)) {
      if (sup.id === u.id) continue;
      await enqueueMail(tx, {
        siteId: u.siteId,
        to: sup.email,
        kind: 'change-request.proposed',
        subject: `Sign-off needed: ${recipe.name} to ${plan.setpointC.toFixed(1)} °C`,
        text: [
          `${u.name} proposes releasing plan ${plan.id} for ${recipe.name}, from ${input.effectiveFrom}.`,
          `Setpoint: ${recipe.currentSetpointC.toFixed(1)} °C now, ${plan.setpointC.toFixed(1)} °C proposed (${plan.strategy}).`,
          `Why: ${input.rationale}`,
          `Expected effect: ${input.expectedEffect}`,
          '',
          `Review and sign: ${link(ctx, row.id)}`,
        ].join('\n'),
        at: now,
      });
    }
    return row.id;
  });
  ctx.mail?.kick();
  return getChangeRequest(ctx, u, id);
}

/**
 * Signs a request after checking the signer's password again. Approval releases the plan on the recipe;
 * approval and rejection close the request and tell the proposer through the outbox in the same transaction.
 */
export async function signChange(ctx: ChangeControlCtx, u: SessionUser, id: number, input: SignatureInput): Promise<ChangeRequestDetail> {
  const { db, clock } = ctx;
  const { found } = await load(db, u, id);
  if (found.request.proposedBy === u.id) throw new HttpError(403, 'own_proposal', 'You proposed this change; another supervisor must sign it');
  const signer = (await findSiteUser(db, u.siteId, u.id))!;
  const ok = await bcrypt.compare(input.password, signer.passwordHash);
  const now = clock.now();
  const refuse = (reason: string) =>
    writeTx(db, (tx) =>
      appendAudit(tx, {
        siteId: u.siteId,
        userId: u.id,
        actor: u.email,
        action: 'signature.refused',
        entity: 'change-request',
        entityId: id,
        newValue: { reason, meaning: input.meaning },
        at: now,
      }),
    );
  if (!ok) {
    await refuse('wrong password');
    throw new HttpError(400, 'wrong_password', 'The password is not right; nothing was signed', { password: 'Password is not right' });
  }
  const tz = await siteTimeZone(db, u.siteId);
  const outcome = await writeTx(db, async (tx) => {
    // Read again inside the write lock: a decision made meanwhile, or an edit to the record, wins over this signature.
    const { found: cur, plan, recipe } = await load(tx, u, id);
    const r = cur.request;
    if (r.status !== 'proposed') return { refused: 'decided' as const, status: r.status };
    const hash = recordHash(plan, r);
    if (hash !== r.recordHash) return { refused: 'changed' as const };
    const sig = await insertSignature(tx, {
      siteId: u.siteId,
      changeRequestId: id,
      userId: u.id,
      printedName: signer.name,
      role: u.role,
      meaning: input.meaning,
      comment: input.comment,
      signedAt: now.toISOString(),
      siteTimeZone: tz,
      recordHash: hash,
    });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'signature.create',
      entity: 'change-request',
      entityId: id,
      newValue: { signatureId: sig.id, printedName: sig.printedName, meaning: sig.meaning, comment: sig.comment, signedAt: sig.signedAt, recordHash: hash },
      at: now,
    });
    if (input.meaning === 'reviewed') return { refused: null };
    const replaced = await currentSide(tx, u.siteId, recipe, plan);
    await decideChangeRequest(tx, id, input.meaning, now.toISOString(), replaced);
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: input.meaning === 'approved' ? 'change-request.approve' : 'change-request.reject',
      entity: 'change-request',
      entityId: id,
      oldValue: { status: 'proposed' },
      newValue: { status: input.meaning, signatureId: sig.id, recordHash: hash },
      at: now,
    });
    if (input.meaning === 'approved') {
      const releasedAt = startOfSiteDay(r.effectiveFrom, tz);
      await updateRecipe(tx, recipe.id, { releasedPlanId: plan.id, releasedAt, currentSetpointC: plan.setpointC, updatedAt: now.toISOString() });
      await appendAudit(tx, {
        siteId: u.siteId,
        userId: u.id,
        actor: u.email,
        action: 'recipe.release',
        entity: 'recipe',
        entityId: recipe.id,
        oldValue: { releasedPlanId: recipe.releasedPlanId, releasedAt: recipe.releasedAt, currentSetpointC: recipe.currentSetpointC },
        newValue: { releasedPlanId: plan.id, releasedAt, currentSetpointC: plan.setpointC, changeRequestId: id },
        at: now,
      });
      await closeOthers(tx, u, recipe, id, 'stale', now);
    }
    const proposer = await findSiteUser(tx, u.siteId, r.proposedBy);
    if (proposer?.isActive) {
      const verdict = input.meaning === 'approved' ? 'approved' : 'rejected';
      await enqueueMail(tx, {
        siteId: u.siteId,
        to: proposer.email,
        kind: `change-request.${verdict}`,
        subject: `Your setpoint change for ${recipe.name} was ${verdict}`,
        text: [
          `${signer.name} ${verdict} your proposal to run ${recipe.name} at ${plan.setpointC.toFixed(1)} °C (plan ${plan.id}).`,
          verdict === 'approved' ? `It is the released setpoint from ${r.effectiveFrom} (site time, ${tz}).` : 'The recipe keeps its current setpoint.',
          ...(input.comment ? [`Comment: ${input.comment}`] : []),
          `Signed ${now.toISOString()} UTC / ${formatSiteTime(now.toISOString(), tz)}.`,
          '',
          `Record: ${link(ctx, id)}`,
        ].join('\n'),
        at: now,
      });
    }
    return { refused: null };
  });
  if (outcome.refused === 'decided') throw new HttpError(409, 'already_decided', `This change was already ${outcome.status}`);
  if (outcome.refused === 'changed') {
    await refuse('record changed since submission');
    throw new HttpError(409, 'record_changed', 'The plan or request changed after it was submitted; it cannot be signed');
  }
  ctx.mail?.kick();
  return getChangeRequest(ctx, u, id);
}

/** The record with its signatures as field/value rows, for a spreadsheet or an archive. */
export async function changeRequestCsv(s: Services, u: SessionUser, id: number): Promise<{ filename: string; csv: string }> {
  const d = await getChangeRequest(s, u, id);
  const side = (prefix: string, v: SetpointSide) => [
    [`${prefix}.source`, v.source, ''],
    [`${prefix}.plan_id`, v.planId, ''],
    [`${prefix}.strategy`, v.strategy, ''],
    [`${prefix}.setpoint_c`, v.setpointC, 'degC'],
    ...(v.stages ?? []).map((st, i) => [`${prefix}.stage_${i + 1}`, `${st.hours} h at ${st.c}`, 'h, degC']),
    [`${prefix}.predicted_product`, v.predictedProductGPerL, 'g/L'],
    [`${prefix}.p10`, v.p10GPerL, 'g/L'],
    [`${prefix}.p50`, v.p50GPerL, 'g/L'],
    [`${prefix}.p90`, v.p90GPerL, 'g/L'],
    [`${prefix}.activity_left`, v.activityLeft, 'fraction'],
    [`${prefix}.profit_per_h`, v.profitPerH, `${u.siteCurrency}/h`],
    [`${prefix}.constraints_met`, v.constraintsMet, ''],
  ];
  const rows: unknown[][] = [
    ['change_request_id', d.id, ''],
    ['status', d.status, ''],
    ['recipe', d.recipeName, ''],
    ['vessel', d.vesselName, ''],
    ['plan_id', d.planId, ''],
    ['proposed_by', d.proposedBy, ''],
    ['proposed_at_utc', d.createdAt, ''],
    ['proposed_at_site', formatSiteTime(d.createdAt, d.siteTimeZone), ''],
    ['effective_from', d.effectiveFrom, `site date, ${d.siteTimeZone}`],
    ['rationale', d.rationale, ''],
    ['expected_effect', d.expectedEffect, ''],
    ['record_hash', d.recordHash, 'sha256'],
    ['record_intact', d.isIntact, ''],
    ['decided_at_utc', d.decidedAt, ''],
    ...side('current', d.current),
    ...side('proposed', d.proposed),
    ...d.signatures.flatMap((sig, i) => {
      const n = `signature_${i + 1}`;
      return [
        [`${n}.printed_name`, sig.printedName, ''],
        [`${n}.role`, sig.role, ''],
        [`${n}.meaning`, sig.meaning, ''],
        [`${n}.signed_at_utc`, sig.signedAtUtc, ''],
        [`${n}.signed_at_site`, sig.signedAtSite, ''],
        [`${n}.comment`, sig.comment, ''],
        [`${n}.record_hash`, sig.recordHash, 'sha256'],
      ];
    }),
  ];
  return { filename: `change-request-${d.id}.csv`, csv: toCsv(['field', 'value', 'unit'], rows) };
}
