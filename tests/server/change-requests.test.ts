import { planBody } from '../fixtures/plan-body';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { first, type Db } from '../../db/client';
import { auditEvents, changeRequests, mailOutbox, plans, recipes, signatures } from '../../db/tables';
import { createMailSender } from '../../server/services/mail';
import { password, startTestApp, type Client, type TestApp } from './harness';

let t: TestApp;
let engineer: Client;
let supervisor: Client;
let recipeId: number;
let lotId: number;

beforeAll(async () => {
  t = await startTestApp();
  [engineer, supervisor] = await Promise.all([t.signIn('engineer'), t.signIn('supervisor')]);
  recipeId = ((await engineer.get('/api/recipes')).body.recipes as { name: string; id: number }[]).find((r) => r.name === 'Glucose syrup DE 95')!.id;
  lotId = ((await engineer.get('/api/lots')).body.lots as { lotCode: string; id: number }[]).find((l) => l.lotCode === 'CGA-2605-11')!.id;
});
afterAll(() => t.close());

// Each proposal needs its own saved plan; the batch length makes them differ.
async function savePlan(batchH: number): Promise<{ id: number; outputs: { setpointC: number } }> {
  const r = await engineer.post('/api/plans', planBody(recipeId, lotId, { batchH }));
  expect(r.status).toBe(201);
  return r.body;
}

const propose = (by: Client, planId: number, over: Record<string, unknown> = {}) =>
  by.post('/api/change-requests', {
    planId,
    rationale: 'The new lot holds up better at 60 °C in QC assays.',
    expectedEffect: '+3 % glucose per batch',
    effectiveFrom: '2026-12-15',
    ...over,
  });

const sign = (by: Client, id: number, meaning: string, pw = password('supervisor'), comment = '') =>
  by.post(`/api/change-requests/${id}/signatures`, { password: pw, meaning, comment });

const recipeRow = async () => (await t.db.select().from(recipes).where(eq(recipes.id, recipeId)).then(first))!;
const auditOf = (action: string, entityId: number) =>
  t.db
    .select()
    .from(auditEvents)
    .where(and(eq(auditEvents.action, action), eq(auditEvents.entityId, String(entityId))))
    .execute();
const signatureCount = async (id: number) => (await t.db.select().from(signatures).where(eq(signatures.changeRequestId, id)).execute()).length;

describe('proposing', () => {
  it('stores the proposal with a record hash, audits it and queues mail to the site supervisors only', async () => {
    const plan = await savePlan(40);
    const r = await propose(engineer, plan.id);
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject({
      status: 'proposed',
      planId: plan.id,
      recipeName: 'Glucose syrup DE 95',
      proposedBy: 'Tomasz Ekwueme',
      isIntact: true,
      signatures: [],
    });
    expect(r.body.recordHash).toMatch(/^[0-9a-f]{64}$/);
    expect(r.body.proposed).toMatchObject({ source: 'proposed-plan', setpointC: plan.outputs.setpointC });
    // No plan is released on the seeded recipe, so its bare setpoint is the current side.
    expect(r.body.current).toMatchObject({ source: 'recipe-setpoint', setpointC: 59, planId: null });
    const [created] = await auditOf('change-request.create', r.body.id);
    expect(created!.newValue).toMatchObject({ planId: plan.id, recordHash: r.body.recordHash });
    expect(created!.oldValue).toMatchObject({ setpointC: 59, releasedPlanId: null });
    const mail = await t.db.select().from(mailOutbox).where(eq(mailOutbox.kind, 'change-request.proposed')).execute();
    expect(mail.map((m) => m.to)).toEqual(['supervisor@haldenbay.test']);
    expect(mail[0]!.status).toBe('pending');
    expect(mail[0]!.text).toContain(`/sign-offs/${r.body.id}`);
  });

  it('refuses a date in the past, a plan of another site and a second open proposal of one plan', async () => {
    const plan = await savePlan(41);
    const before = (await t.db.select().from(changeRequests).execute()).length;
    const past = await propose(engineer, plan.id, { effectiveFrom: '2026-11-30' });
    expect(past.status).toBe(400);
    expect(past.body.error.fields.effectiveFrom).toBeDefined();
    const otherEngineer = await t.signIn('engineer', 'other');
    expect((await propose(otherEngineer, plan.id)).status).toBe(400);
    expect((await propose(engineer, plan.id)).status).toBe(201);
    expect((await propose(engineer, plan.id)).body.error.code).toBe('already_proposed');
    expect((await t.db.select().from(changeRequests).execute()).length).toBe(before + 1);
  });

  it('shows a request to its own site only', async () => {
    const plan = await savePlan(42);
    const { id } = (await propose(engineer, plan.id)).body;
    const otherSupervisor = await t.signIn('supervisor', 'other');
    expect((await otherSupervisor.get(`/api/change-requests/${id}`)).status).toBe(404);
    expect((await sign(otherSupervisor, id, 'approved')).status).toBe(404);
    expect((await otherSupervisor.get('/api/change-requests')).body.changeRequests).toEqual([]);
    expect(await signatureCount(id)).toBe(0);
  });
});

describe('signing', () => {
  it('refuses a signature on one’s own proposal (four eyes) and changes nothing', async () => {
    const plan = await savePlan(43);
    const { id } = (await propose(supervisor, plan.id)).body;
    const before = await recipeRow();
    const r = await sign(supervisor, id, 'approved');
    expect(r.status).toBe(403);
    expect(r.body.error.code).toBe('own_proposal');
    expect(await signatureCount(id)).toBe(0);
    expect((await supervisor.get(`/api/change-requests/${id}`)).body.status).toBe('proposed');
    expect(await recipeRow()).toEqual(before);
  });

  it('refuses a wrong password, audits the attempt and signs nothing', async () => {
    const plan = await savePlan(44);
    const { id } = (await propose(engineer, plan.id)).body;
    const r = await sign(supervisor, id, 'approved', 'not-my-password');
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('wrong_password');
    expect(r.body.error.fields.password).toBeDefined();
    expect(await signatureCount(id)).toBe(0);
    const [refused] = await auditOf('signature.refused', id);
    expect(refused).toMatchObject({ actor: 'supervisor@haldenbay.test', newValue: { reason: 'wrong password', meaning: 'approved' } });
    expect((await recipeRow()).releasedPlanId).toBeNull();
  });

  it('refuses to sign when the stored plan changed after submission', async () => {
    const plan = await savePlan(45);
    const { id } = (await propose(engineer, plan.id)).body;
    const row = (await t.db.select().from(plans).where(eq(plans.id, plan.id)).then(first))!;
    await t.db
      .update(plans)
      .set({ outputs: { ...row.outputs, setpointC: row.outputs.setpointC + 5 } })
      .where(eq(plans.id, plan.id))
      .execute();
    expect((await supervisor.get(`/api/change-requests/${id}`)).body.isIntact).toBe(false);
    const r = await sign(supervisor, id, 'approved');
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe('record_changed');
    expect(await signatureCount(id)).toBe(0);
    expect((await auditOf('signature.refused', id))[0]!.newValue).toMatchObject({ reason: 'record changed since submission' });
    expect((await recipeRow()).releasedPlanId).toBeNull();
  });

  it('refuses to sign when the request text changed after submission', async () => {
    const plan = await savePlan(46);
    const { id } = (await propose(engineer, plan.id)).body;
    await t.db.update(changeRequests).set({ effectiveFrom: '2026-12-02' }).where(eq(changeRequests.id, id)).execute();
    expect((await sign(supervisor, id, 'reviewed')).body.error.code).toBe('record_changed');
    expect(await signatureCount(id)).toBe(0);
  });

  it('approves: binds the signature to the hash, releases the plan on the recipe, audits each step and tells the proposer', async () => {
    const plan = await savePlan(47);
    const proposed = (await propose(engineer, plan.id)).body;
    const reviewed = await sign(supervisor, proposed.id, 'reviewed', password('supervisor'), 'Inputs checked against the lot certificate');
    expect(reviewed.status).toBe(201);
    expect(reviewed.body.status).toBe('proposed');
    t.clock.advanceMinutes(30);
    const before = await recipeRow();
    const r = await sign(supervisor, proposed.id, 'approved', password('supervisor'), 'Go ahead');
    expect(r.status).toBe(201);
    expect(r.body.status).toBe('approved');
    expect(r.body.decidedAt).toBe(t.clock.now().toISOString());
    // The demo site keeps Europe/Berlin time: UTC+1 in winter (CET), per the IANA time zone database.
    expect(r.body.signatures.map((s: Record<string, unknown>) => [s.printedName, s.meaning, s.signedAtUtc, s.signedAtSite, s.recordHash])).toEqual([
      ['Marit Oyelaran', 'reviewed', r.body.signatures[0].signedAtUtc, formatBerlin(r.body.signatures[0].signedAtUtc), proposed.recordHash],
      ['Marit Oyelaran', 'approved', t.clock.now().toISOString(), formatBerlin(t.clock.now().toISOString()), proposed.recordHash],
    ]);
    expect(r.body.signatures[1].signedAtSite).toMatch(/ CET \(Europe\/Berlin\)$/);
    // The released state is what the approval replaced, kept on the record.
    expect(r.body.current).toMatchObject({ source: 'recipe-setpoint', setpointC: before.currentSetpointC });
    const after = await recipeRow();
    // 2026-12-15 00:00 in Berlin (CET, UTC+1) is 2026-12-14 23:00 UTC.
    expect(after).toMatchObject({ releasedPlanId: plan.id, releasedAt: '2026-12-14T23:00:00.000Z', currentSetpointC: plan.outputs.setpointC });
    expect((await engineer.get(`/api/recipes/${recipeId}`)).body.recipe).toMatchObject({ releasedPlanId: plan.id, currentSetpointC: plan.outputs.setpointC });
    expect(await auditOf('signature.create', proposed.id)).toHaveLength(2);
    expect((await auditOf('change-request.approve', proposed.id))[0]).toMatchObject({ oldValue: { status: 'proposed' }, newValue: { status: 'approved' } });
    expect((await auditOf('recipe.release', recipeId)).at(-1)).toMatchObject({
      oldValue: { releasedPlanId: null, currentSetpointC: before.currentSetpointC },
      newValue: { releasedPlanId: plan.id, currentSetpointC: plan.outputs.setpointC, changeRequestId: proposed.id },
    });
    const mail = await t.db.select().from(mailOutbox).where(eq(mailOutbox.kind, 'change-request.approved')).execute();
    expect(mail.map((m) => m.to)).toEqual(['engineer@haldenbay.test']);
    expect(mail[0]!.text).toContain('Marit Oyelaran approved');
    // A decided request takes no more signatures.
    expect((await sign(supervisor, proposed.id, 'rejected')).body.error.code).toBe('already_decided');
    expect(await signatureCount(proposed.id)).toBe(2);

    // The next proposal compares against the plan just released.
    const next = (await propose(engineer, (await savePlan(30)).id)).body;
    expect(next.current).toMatchObject({ source: 'released-plan', planId: plan.id });
  });

  it('rejects: closes the request, keeps the recipe and tells the proposer', async () => {
    const plan = await savePlan(48);
    const { id } = (await propose(engineer, plan.id)).body;
    const before = await recipeRow();
    const r = await sign(supervisor, id, 'rejected', password('supervisor'), 'Wait for the second QC assay');
    expect(r.body.status).toBe('rejected');
    expect(await recipeRow()).toEqual(before);
    expect(await auditOf('change-request.reject', id)).toHaveLength(1);
    expect((await t.db.select().from(mailOutbox).where(eq(mailOutbox.kind, 'change-request.rejected')).orderBy(mailOutbox.id)).map((m) => m.to)).toEqual([
      'engineer@haldenbay.test',
    ]);
  });

  it('keeps a decision when the mail relay fails: the notice stays pending for a retry', async () => {
    const plan = await savePlan(49);
    const { id } = (await propose(engineer, plan.id)).body;
    expect((await sign(supervisor, id, 'rejected')).status).toBe(201);
    const sender = createMailSender({
      db: t.db as Db,
      clock: t.clock,
      transport: { sendMail: () => Promise.reject(new Error('relay down')) },
      from: 'x@y.test',
    });
    await sender.deliverDue();
    await sender.stop();
    const notice = (await t.db.select().from(mailOutbox).where(eq(mailOutbox.kind, 'change-request.rejected')).orderBy(mailOutbox.id)).at(-1)!;
    expect(notice).toMatchObject({ status: 'pending', attempts: 1, lastError: 'relay down' });
    expect((await t.db.select().from(changeRequests).where(eq(changeRequests.id, id)).then(first))!.status).toBe('rejected');
  });

  it('exports the record with printed names, UTC and site times and meanings', async () => {
    const plan = await savePlan(50);
    const { id } = (await propose(engineer, plan.id)).body;
    await sign(supervisor, id, 'approved', password('supervisor'), 'Fine');
    const r = await engineer.get(`/api/change-requests/${id}/export.csv`);
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toContain('text/csv');
    const lines = (r.body as string).split('\r\n');
    expect(lines).toContain('signature_1.printed_name,Marit Oyelaran,');
    expect(lines).toContain('signature_1.meaning,approved,');
    expect(lines).toContain(`signature_1.signed_at_utc,${t.clock.now().toISOString()},`);
    expect(lines).toContain(`signature_1.signed_at_site,${formatBerlin(t.clock.now().toISOString())},`);
    expect(lines).toContain(`proposed.setpoint_c,${plan.outputs.setpointC},degC`);
  });
});

describe('sign rate limit and audit chain', () => {
  it('stops password guessing at the signature after the per-account budget, like sign-in', async () => {
    const app = await startTestApp({ signInLimit: { perAddress: 1000, perAccount: 3, windowMs: 60_000 } });
    try {
      const [eng, sup] = await Promise.all([app.signIn('engineer'), app.signIn('supervisor')]);
      const rId = ((await eng.get('/api/recipes')).body.recipes as { id: number }[])[0]!.id;
      const detail = (await eng.get(`/api/recipes/${rId}`)).body;
      const r = detail.recipe;
      const plan = (
        await eng.post('/api/plans', {
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
        })
      ).body;
      const { id } = (await propose(eng, plan.id)).body;
      for (let i = 0; i < 3; i++) expect((await sign(sup, id, 'approved', 'guess-' + i)).status).toBe(400);
      const blocked = await sign(sup, id, 'approved');
      expect(blocked.status).toBe(429);
      expect(await app.db.select().from(signatures).execute()).toHaveLength(0);
    } finally {
      await app.close();
    }
  });

  it('detects an edited signature event in the audit chain', async () => {
    const admin = await t.signIn('admin');
    const first = (await admin.get('/api/audit-events/verify')).body;
    // Earlier tests edited a plan and a request row directly: the check names those records, and the chain is whole.
    expect(first.firstBrokenId).toBeNull();
    expect(first.problems.map((p: { message: string }) => p.message)).toEqual(
      [6, 7].map((id) => `Change request ${id}: its plan or its text changed after it was submitted (the record no longer hashes as submitted)`),
    );
    const [row] = await t.db.select().from(auditEvents).where(eq(auditEvents.action, 'signature.create'));
    if (!row) throw new Error('no signature event');
    await t.db
      .update(auditEvents)
      .set({ newValue: { ...(row.newValue as object), meaning: 'rejected' } })
      .where(eq(auditEvents.id, row.id))
      .execute();
    expect((await admin.get('/api/audit-events/verify')).body).toMatchObject({ ok: false, firstBrokenId: row.id });
  });
});

// Independent of server/site-time.ts: Berlin is UTC+1 all of December (CET; IANA time zone database).
function formatBerlin(iso: string): string {
  const d = new Date(Date.parse(iso) + 3_600_000).toISOString();
  return `${d.slice(0, 10)} ${d.slice(11, 19)} CET (Europe/Berlin)`;
}

describe('one request per recipe at a time', () => {
  it('a newer request supersedes the waiting one: closed unsigned, pointing at the newer, audited; signing it is refused', async () => {
    const older = (await propose(engineer, (await savePlan(44)).id)).body;
    const newer = (await propose(engineer, (await savePlan(45)).id, { rationale: 'A later plan with the lot assay of this week.' })).body;
    const closed = (await supervisor.get(`/api/change-requests/${older.id}`)).body;
    expect(closed).toMatchObject({ status: 'superseded', supersededBy: newer.id });
    expect(closed.decidedAt).not.toBeNull();
    // The comparison it showed is kept with it.
    expect(closed.current).toMatchObject(older.current);
    expect((await supervisor.get(`/api/change-requests/${newer.id}`)).body).toMatchObject({ status: 'proposed', supersededBy: null });
    const [event] = await auditOf('change-request.supersede', older.id);
    expect(event).toMatchObject({ oldValue: { status: 'proposed' }, newValue: { status: 'superseded', supersededBy: newer.id } });
    const refused = await sign(supervisor, older.id, 'approved');
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('already_decided');
    expect(await signatureCount(older.id)).toBe(0);
    const waiting = (await supervisor.get('/api/change-requests?status=proposed')).body.changeRequests as { recipeId: number }[];
    expect(waiting.filter((c) => c.recipeId === recipeId)).toHaveLength(1);
  });

  it('a release makes any other waiting request of the recipe stale', async () => {
    const plan = await savePlan(46);
    const released = (await propose(engineer, plan.id)).body;
    // A request left waiting from before one-at-a-time (or written by another path) is closed when another is released.
    const otherPlan = await savePlan(47);
    const left = (await propose(engineer, otherPlan.id)).body;
    await t.db.update(changeRequests).set({ status: 'proposed', supersededBy: null, decidedAt: null }).where(eq(changeRequests.id, released.id)).execute();
    expect((await sign(supervisor, released.id, 'approved')).status).toBe(201);
    expect((await recipeRow()).releasedPlanId).toBe(plan.id);
    const stale = (await supervisor.get(`/api/change-requests/${left.id}`)).body;
    expect(stale).toMatchObject({ status: 'stale', supersededBy: released.id });
    expect(await auditOf('change-request.stale', left.id)).toHaveLength(1);
    expect((await sign(supervisor, left.id, 'approved')).status).toBe(409);
    expect((await recipeRow()).releasedPlanId).toBe(plan.id);
  });
});
