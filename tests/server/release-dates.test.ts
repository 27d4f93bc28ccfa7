import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { password, startTestApp, type Client, type TestApp } from './harness';

// A released plan's effective date is honoured for new batches, and dates are real calendar dates.
let t: TestApp;
let eng: Client;
let sup: Client;
beforeAll(async () => {
  t = await startTestApp();
  [eng, sup] = await Promise.all([t.signIn('engineer'), t.signIn('supervisor')]);
});
afterAll(() => t.close());

async function recipe(name: string) {
  const list = (await eng.get('/api/recipes')).body.recipes as { id: number; name: string }[];
  return (await eng.get(`/api/recipes/${list.find((r) => r.name === name)!.id}`)).body.recipe;
}

/** A saved plan for the recipe (batchH varies the optimum), released through change control from `effectiveFrom`. */
async function release(rec: any, batchH: number, effectiveFrom: string): Promise<number> {
  const plan = await eng.post('/api/plans', {
    recipeId: rec.id,
    lotId: rec.lotId,
    batchH,
    turnaroundH: rec.turnaroundH,
    doseGPerL: rec.doseGPerL,
    s0GPerL: rec.s0GPerL,
    kmGPerL: rec.kmGPerL,
    productPricePerKg: rec.productPricePerKg,
    enzymePricePerKg: rec.enzymePricePerKg,
    heatingCostPerDegCHour: rec.heatingCostPerDegCHour,
    currentSetpointC: rec.currentSetpointC,
    strategy: 'isothermal',
    stages: 3,
    maxStepC: 3,
    uncertainty: null,
  });
  expect(plan.status, JSON.stringify(plan.body)).toBe(201);
  const cr = await eng.post('/api/change-requests', {
    planId: plan.body.id,
    rationale: 'A longer batch suits the new schedule.',
    expectedEffect: 'More product per batch',
    effectiveFrom,
  });
  expect(cr.status, JSON.stringify(cr.body)).toBe(201);
  const signed = await sup.post(`/api/change-requests/${cr.body.id}/signatures`, { password: password('supervisor'), meaning: 'approved', comment: '' });
  expect(signed.body.status).toBe('approved');
  return plan.body.id;
}

async function start(rec: any) {
  const res = await sup.post('/api/batches', { recipeId: rec.id, vesselId: rec.vesselId, lotId: rec.lotId, startedAt: t.clock.now().toISOString() });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body;
}

async function closeAllRunning() {
  const list = (await sup.get('/api/batches')).body.batches as { id: number; state: string }[];
  for (const b of list.filter((x) => x.state === 'running')) expect((await sup.post(`/api/batches/${b.id}/close`, {})).status).toBe(200);
}

describe('effective date of a released plan', () => {
  it('a recipe never released keeps its setpoint until an approved plan’s date comes', async () => {
    await closeAllRunning();
    const rec = await recipe('Lactose-free milk base');
    const before = rec.currentSetpointC;
    const planId = await release(rec, rec.batchH, '2027-02-13');
    const batch = await start(rec);
    expect(batch.program.source).toBe('current_setpoint');
    expect(batch.program.planId).toBeNull();
    expect(batch.program.stages).toEqual([{ hours: rec.batchH, c: before }]);
    // The recipe already names the approved plan and its date (site time, Europe/Berlin: midnight is 23:00 UTC).
    expect(await recipe('Lactose-free milk base')).toMatchObject({ releasedPlanId: planId, releasedAt: '2027-02-12T23:00:00.000Z' });
  });

  it('until the new plan’s date the previous released plan applies, from it the new one', async () => {
    await closeAllRunning();
    const rec = await recipe('Glucose syrup DE 95');
    const now = await release(rec, rec.batchH, '2026-12-01');
    const later = await release(rec, rec.batchH + 4, '2027-02-13');
    expect((await start(rec)).program).toMatchObject({ source: 'released_plan', planId: now });
    await closeAllRunning();
    // 2027-02-13 08:00 UTC (09:00 site time): the later plan is in effect.
    t.clock.advanceMinutes((Date.parse('2027-02-13T08:00:00Z') - t.clock.now().getTime()) / 60_000);
    [eng, sup] = await Promise.all([t.signIn('engineer'), t.signIn('supervisor')]);
    expect((await start(rec)).program).toMatchObject({ source: 'released_plan', planId: later });
  });
});

describe('calendar dates', () => {
  it.each(['2026-13-45', '2027-02-30', '2027-00-10'])('refuses %s as an effective date, naming the field', async (day) => {
    const plans = (await eng.get('/api/plans')).body.plans as { id: number }[];
    const res = await eng.post('/api/change-requests', {
      planId: plans[0]!.id,
      rationale: 'A longer batch suits the new schedule.',
      expectedEffect: 'More product',
      effectiveFrom: day,
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.effectiveFrom).toMatch(/Not a calendar date/);
  });

  it('refuses 30 February as a lot’s expiry, naming the field (it used to roll over to 2 March)', async () => {
    const procurement = await t.signIn('procurement');
    const res = await procurement.post('/api/lots', {
      enzymeId: 1,
      lotCode: 'CAL-1',
      receivedOn: '2027-01-10',
      expiresOn: '2027-02-30',
      quantityKg: 5,
      certActivity: 1000,
      certStability: { form: 'halfLife', tempC: 50, hours: 10 },
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.expiresOn).toMatch(/Not a calendar date/);
  });
});
