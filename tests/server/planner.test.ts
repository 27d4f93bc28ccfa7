import { first } from '../../db/client';
import { rowCount } from '../support/raw-sql';
import { planBody as demoPlanBody } from '../fixtures/plan-body';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { auditEvents, plans, recipes, vessels } from '../../db/tables';
import { MODEL_VERSION, simulate, stagesWithRamps } from '../../src/model';
import { startTestApp, type Client, type TestApp } from './harness';

let t: TestApp;
let engineer: Client;
let lotIds: Record<string, number>;
let recipeIds: Record<string, number>;
let vesselIds: Record<string, number>;

beforeAll(async () => {
  t = await startTestApp();
  engineer = await t.signIn('engineer');
  lotIds = Object.fromEntries(((await engineer.get('/api/lots')).body.lots as { lotCode: string; id: number }[]).map((l) => [l.lotCode, l.id]));
  recipeIds = Object.fromEntries(((await engineer.get('/api/recipes')).body.recipes as { name: string; id: number }[]).map((r) => [r.name, r.id]));
  vesselIds = Object.fromEntries(((await engineer.get('/api/vessels')).body.vessels as { name: string; id: number }[]).map((v) => [v.name, v.id]));
});
afterAll(() => t.close());

const count = async (table: typeof vessels | typeof recipes | typeof plans | typeof auditEvents) => (await t.db.select().from(table).execute()).length;

const GOOD_VESSEL = { name: 'R-400 Pilot', workingVolumeL: 500, minC: 10, maxC: 90, maxHeatCPerH: 20, maxCoolCPerH: 15, hygienicMinC: 40 };

describe('vessels', () => {
  it('lets an engineer add a vessel and audits it', async () => {
    const audits = await count(auditEvents);
    const r = await engineer.post('/api/vessels', GOOD_VESSEL);
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject(GOOD_VESSEL);
    expect(await count(auditEvents)).toBe(audits + 1);
    expect((await engineer.get('/api/vessels')).body.vessels.map((v: { name: string }) => v.name)).toContain('R-400 Pilot');
  });

  it.each([
    ['min not below max', { ...GOOD_VESSEL, name: 'X1', minC: 90, maxC: 90 }, 'maxC'],
    ['hygienic minimum above the range', { ...GOOD_VESSEL, name: 'X2', hygienicMinC: 95 }, 'hygienicMinC'],
    ['hygienic minimum below the range', { ...GOOD_VESSEL, name: 'X3', hygienicMinC: 5 }, 'hygienicMinC'],
    ['a zero heating rate', { ...GOOD_VESSEL, name: 'X4', maxHeatCPerH: 0 }, 'maxHeatCPerH'],
    ['a negative cooling rate', { ...GOOD_VESSEL, name: 'X5', maxCoolCPerH: -3 }, 'maxCoolCPerH'],
    ['no volume', { ...GOOD_VESSEL, name: 'X6', workingVolumeL: 0 }, 'workingVolumeL'],
    ['a volume of 1e308 L', { ...GOOD_VESSEL, name: 'X7', workingVolumeL: 1e308 }, 'workingVolumeL'],
    ['a misspelt key', { ...GOOD_VESSEL, name: 'X8', workingVolumL: 500 }, 'workingVolumL'],
  ])('refuses %s with the field named', async (_label, body, field) => {
    const before = await count(vessels);
    const r = await engineer.post('/api/vessels', body);
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)).toContain(field);
    expect(await count(vessels)).toBe(before);
  });

  it('checks a PATCH against the merged vessel and leaves it unchanged when refused', async () => {
    const id = vesselIds['R-204 Lactose tank']!;
    const r = await engineer.patch(`/api/vessels/${id}`, { maxC: 6 });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.hygienicMinC).toBeDefined();
    const after = (await t.db.select().from(vessels).where(eq(vessels.id, id)).then(first))!;
    expect(after.maxC).toBe(60);
  });

  it('lets an admin change a vessel, but not a supervisor or a vessel of another site', async () => {
    const id = vesselIds['R-204 Lactose tank']!;
    const admin = await t.signIn('admin');
    expect((await admin.patch(`/api/vessels/${id}`, { maxHeatCPerH: 11 })).body.maxHeatCPerH).toBe(11);
    const supervisor = await t.signIn('supervisor');
    expect((await supervisor.patch(`/api/vessels/${id}`, { maxHeatCPerH: 50 })).status).toBe(403);
    const otherEngineer = await t.signIn('engineer', 'other');
    expect((await otherEngineer.patch(`/api/vessels/${id}`, { maxHeatCPerH: 50 })).status).toBe(404);
    expect((await t.db.select().from(vessels).where(eq(vessels.id, id)).then(first))!.maxHeatCPerH).toBe(11);
  });

  it('refuses a duplicate name with 409', async () => {
    const r = await engineer.post('/api/vessels', { ...GOOD_VESSEL, name: 'R-101 Saccharifier' });
    expect(r.status).toBe(409);
  });
});

const recipeBody = () => ({
  name: 'Pilot glucose',
  lotId: lotIds['CGA-2608-03']!,
  vesselId: vesselIds['R-101 Saccharifier']!,
  s0GPerL: 250,
  kmGPerL: 2,
  doseGPerL: 0.5,
  vmaxRefGPerLH: 6,
  edKJPerMol: 300,
  batchH: 36,
  turnaroundH: 5,
  fillC: 40,
  productPricePerKg: 0.5,
  enzymePricePerKg: 18,
  heatingCostPerDegCHour: 0.5,
  currentSetpointC: 60,
});

describe('recipes', () => {
  it('lists the demo recipes with their lot, enzyme and vessel', async () => {
    const r = await engineer.get('/api/recipes');
    expect(r.status).toBe(200);
    expect(r.body.recipes.length).toBe(3);
    const glucose = r.body.recipes.find((x: { name: string }) => x.name === 'Glucose syrup DE 95');
    expect(glucose).toMatchObject({ lotCode: 'CGA-2605-11', enzymeName: 'Amylo GA-17', vesselName: 'R-101 Saccharifier', releasedPlanId: null });
  });

  it('gives the planner only accepted lots of the recipe enzyme', async () => {
    const r = await engineer.get(`/api/recipes/${recipeIds['Glucose syrup DE 95']}`);
    expect(r.status).toBe(200);
    // Seed: CGA-2605-11 and CGA-2608-03 accepted, CGA-2611-07 quarantined.
    expect(r.body.lots.map((l: { lotCode: string }) => l.lotCode).sort()).toEqual(['CGA-2605-11', 'CGA-2608-03']);
    expect(r.body.vessel.maxC).toBe(75);
    expect(r.body.enzyme.tRefC).toBe(60);
  });

  it('creates a recipe on an accepted lot, and the enzyme follows the lot', async () => {
    const r = await engineer.post('/api/recipes', recipeBody());
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject({ name: 'Pilot glucose', enzymeName: 'Amylo GA-17', lotCode: 'CGA-2608-03' });
  });

  it.each([
    ['a quarantined lot', { lotId: 'CGA-2611-07' }, 'lotId'],
    ['a rejected lot', { lotId: 'OF-LX5-1107' }, 'lotId'],
    ['a setpoint outside the vessel', { currentSetpointC: 80 }, 'currentSetpointC'],
    ['a zero Km', { kmGPerL: 0 }, 'kmGPerL'],
    ['a negative dose', { doseGPerL: -1 }, 'doseGPerL'],
  ])('refuses %s', async (_label, change, field) => {
    const before = await count(recipes);
    const body = { ...recipeBody(), name: `Bad ${field}`, ...change };
    if (typeof body.lotId === 'string') body.lotId = lotIds[body.lotId]!;
    const r = await engineer.post('/api/recipes', body);
    expect(r.status).toBe(400);
    expect(r.body.error.fields[field]).toBeDefined();
    expect(await count(recipes)).toBe(before);
  });

  it('refuses a lot of another site as unknown', async () => {
    const other = await t.signIn('engineer', 'other');
    const otherLot = ((await other.get('/api/lots')).body.lots as { lotCode: string; id: number }[]).find((l) => l.lotCode === 'CGA-2605-11')!;
    const r = await engineer.post('/api/recipes', { ...recipeBody(), name: 'Cross site', lotId: otherLot.id });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.lotId).toMatch(/No such lot/);
  });

  it('patches a recipe, refusing a lot of another enzyme', async () => {
    const id = recipeIds['Glucose syrup DE 95']!;
    const bad = await engineer.patch(`/api/recipes/${id}`, { lotId: lotIds['OF-LX5-0926'] });
    expect(bad.status).toBe(400);
    const ok = await engineer.patch(`/api/recipes/${id}`, { lotId: lotIds['CGA-2608-03'], batchH: 40 });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ lotCode: 'CGA-2608-03', batchH: 40 });
    await engineer.patch(`/api/recipes/${id}`, { lotId: lotIds['CGA-2605-11'], batchH: 48 });
  });

  it('leaves the production setpoint to change control: a PATCH cannot move it, nor a vessel that cannot hold it', async () => {
    const id = recipeIds['Glucose syrup DE 95']!;
    const r = await engineer.patch(`/api/recipes/${id}`, { currentSetpointC: 50 });
    expect(r.status).toBe(400);
    // With R-204 lowered to 55 °C the recipe's 59 °C no longer fits it.
    await engineer.patch(`/api/vessels/${vesselIds['R-204 Lactose tank']}`, { maxC: 55, hygienicMinC: 8 });
    const moved = await engineer.patch(`/api/recipes/${id}`, { vesselId: vesselIds['R-204 Lactose tank'] });
    await engineer.patch(`/api/vessels/${vesselIds['R-204 Lactose tank']}`, { maxC: 60 });
    expect(moved.status).toBe(400);
    expect(moved.body.error.fields.currentSetpointC).toBeDefined();
    const after = (await t.db.select().from(recipes).where(eq(recipes.id, id)).then(first))!;
    expect(after.currentSetpointC).toBe(59);
    expect(after.vesselId).toBe(vesselIds['R-101 Saccharifier']);
  });

  it('keeps recipe writes to engineers and admins, and other sites out', async () => {
    const id = recipeIds['Glucose syrup DE 95']!;
    for (const role of ['supervisor', 'operator', 'procurement'] as const) {
      expect((await (await t.signIn(role)).patch(`/api/recipes/${id}`, { batchH: 10 })).status).toBe(403);
    }
    expect((await (await t.signIn('engineer', 'other')).get(`/api/recipes/${id}`)).status).toBe(404);
  });
});

const planBody = (over: Record<string, unknown> = {}) => demoPlanBody(recipeIds['Glucose syrup DE 95']!, lotIds['CGA-2605-11']!, over);

describe('plans', () => {
  it('refuses numbers the client sends for the server to compute, naming each, and recomputes from the inputs', async () => {
    const plansBefore = await rowCount(t.db, 'plans');
    const forged = await engineer.post('/api/plans', {
      ...planBody(),
      outputs: { setpointC: 70, predictedProductGPerL: 9999 },
      predictedProductGPerL: 9999,
      modelVersion: 'forged',
    });
    expect(forged.status).toBe(400);
    expect(Object.keys(forged.body.error.fields).sort()).toEqual(['modelVersion', 'outputs', 'predictedProductGPerL']);
    expect(forged.body.error.fields.modelVersion).toMatch(/Unknown field "modelVersion"/);
    expect(await rowCount(t.db, 'plans')).toBe(plansBefore);
    const r = await engineer.post('/api/plans', planBody());
    expect(r.status).toBe(201);
    const o = r.body.outputs;
    expect(r.body.modelVersion).toBe(MODEL_VERSION);
    expect(r.body.inputs).not.toHaveProperty('outputs');
    // Independent of the planning module: the lot's assay fit (kd and Ed at tRef 60 °C), Ea 55, Vmax 7.5 g/L/h,
    // run with a heat-up from 45 °C at 12 °C/h, as stated in db/seed.ts.
    const fit = (await engineer.get(`/api/lots/${r.body.inputs.lotId}`)).body.assays.find((a: { fit: unknown }) => a.fit).fit;
    const enzyme = { tRefC: 60, vmaxRef: 7.5, eaKJPerMol: 55, kdRefPerH: fit.kdRefPerH, edKJPerMol: fit.edKJPerMol };
    const log = stagesWithRamps([{ hours: 48, c: o.setpointC }], 45, 12, 8);
    expect(o.predictedProductGPerL).toBeCloseTo(simulate(enzyme, { s0GPerL: 300, kmGPerL: 2 }, 48, { log }).productGPerL, 9);
    // The recommendation is the best setpoint held for the batch: half a degree either way makes less.
    const held = (c: number) => simulate(enzyme, { s0GPerL: 300, kmGPerL: 2 }, 48, { setpointC: c }).productGPerL;
    expect(held(o.setpointC)).toBeGreaterThan(held(o.setpointC + 0.5));
    expect(held(o.setpointC)).toBeGreaterThan(held(o.setpointC - 0.5));
    expect(o.setpointC).toBeGreaterThanOrEqual(20);
    expect(o.setpointC).toBeLessThanOrEqual(75);
    expect(r.body.contentHash).toMatch(/^[0-9a-f]{64}$/);
  });

  it('refuses a plan priced at 1e308 before anything is written, naming the field', async () => {
    const before = { plans: await count(plans), audit: await count(auditEvents) };
    const r = await engineer.post('/api/plans', planBody({ productPricePerKg: 1e308 }));
    expect(r.status).toBe(400);
    expect(r.body.error.fields.productPricePerKg).toMatch(/At most 1,000,000 per kg/);
    expect({ plans: await count(plans), audit: await count(auditEvents) }).toEqual(before);
    expect((await engineer.get('/api/plans')).status).toBe(200);
  });

  it('refuses a plan whose figures would not be finite (a vessel stored before the volume limit) and keeps the plan list readable', async () => {
    const id = vesselIds['R-101 Saccharifier']!;
    const { workingVolumeL } = (await t.db.select().from(vessels).where(eq(vessels.id, id)).then(first))!;
    await t.db.update(vessels).set({ workingVolumeL: 1e308 }).where(eq(vessels.id, id)).execute();
    try {
      const before = { plans: await count(plans), audit: await count(auditEvents) };
      const r = await engineer.post('/api/plans', planBody({ productPricePerKg: 1e6 }));
      expect(r.status).toBe(400);
      expect(r.body.error.code).toBe('not_computable');
      expect(r.body.error.message).toMatch(/profitPerH/);
      expect({ plans: await count(plans), audit: await count(auditEvents) }).toEqual(before);
      expect((await engineer.get('/api/plans')).status).toBe(200);
    } finally {
      await t.db.update(vessels).set({ workingVolumeL }).where(eq(vessels.id, id)).execute();
    }
  });

  it('recommends a lower setpoint for a longer batch', async () => {
    const short = await engineer.post('/api/plans', planBody({ batchH: 24 }));
    const long = await engineer.post('/api/plans', planBody({ batchH: 72 }));
    expect(long.body.outputs.setpointC).toBeLessThan(short.body.outputs.setpointC);
  });

  it('stores P10/P50/P90 when the uncertainty is asked for, reproducibly from the seed', async () => {
    const u = { draws: 1000, seed: 7, sensorBiasSdC: 0.5, doseRelSd: 0.05 };
    const a = await engineer.post('/api/plans', planBody({ uncertainty: u }));
    const b = await engineer.post('/api/plans', planBody({ uncertainty: u }));
    const ua = a.body.outputs.uncertainty;
    expect(ua.p10).toBeLessThan(ua.p50);
    expect(ua.p50).toBeLessThan(ua.p90);
    expect(ua.parameterSpread).toBe('fit');
    expect(b.body.outputs.uncertainty).toEqual(ua);
    expect(b.body.contentHash).toBe(a.body.contentHash);
    const row = (await t.db.select().from(plans).where(eq(plans.id, a.body.id)).then(first))!;
    expect(row.p10GPerL).toBe(ua.p10);
  });

  it('never recommends outside the vessel: a lowered maximum binds the setpoint and the profile', async () => {
    const id = vesselIds['R-101 Saccharifier']!;
    await engineer.patch(`/api/vessels/${id}`, { maxC: 58 });
    const iso = await engineer.post('/api/plans', planBody({ batchH: 6 }));
    const staged = await engineer.post('/api/plans', planBody({ batchH: 6, strategy: 'staged' }));
    await engineer.patch(`/api/vessels/${id}`, { maxC: 75 });
    expect(iso.body.outputs.setpointC).toBe(58);
    expect(iso.body.outputs.atBound).toBe('upper');
    expect(staged.body.outputs.stages.every((s: { c: number }) => s.c <= 58)).toBe(true);
    expect(staged.body.outputs.boundsC).toEqual([20, 58]);
  });

  it('refuses plans on lots that are not accepted or of another enzyme, and on other sites’ recipes', async () => {
    const before = await count(plans);
    expect((await engineer.post('/api/plans', planBody({ lotId: lotIds['CGA-2611-07'] }))).body.error.code).toBe('lot_not_accepted');
    expect((await engineer.post('/api/plans', planBody({ lotId: lotIds['TAA-4471'] }))).status).toBe(400);
    expect((await engineer.post('/api/plans', planBody({ batchH: -4 }))).status).toBe(400);
    const other = await t.signIn('engineer', 'other');
    expect((await other.post('/api/plans', planBody())).status).toBe(404);
    expect(await count(plans)).toBe(before);
  });

  it('lets supervisors read plans but only engineers save them; plans have no edit route', async () => {
    const supervisor = await t.signIn('supervisor');
    expect((await supervisor.post('/api/plans', planBody())).status).toBe(403);
    const list = await supervisor.get(`/api/plans?recipeId=${recipeIds['Glucose syrup DE 95']}`);
    expect(list.status).toBe(200);
    expect(list.body.plans.length).toBeGreaterThan(0);
    const one = await supervisor.get(`/api/plans/${list.body.plans[0].id}`);
    expect(one.body.id).toBe(list.body.plans[0].id);
    expect((await engineer.patch(`/api/plans/${one.body.id}`, { inputs: {} })).status).toBe(404);
    expect((await engineer.del(`/api/plans/${one.body.id}`)).status).toBe(404);
    expect((await (await t.signIn('operator')).get('/api/plans')).status).toBe(403);
    expect((await (await t.signIn('supervisor', 'other')).get(`/api/plans/${one.body.id}`)).status).toBe(404);
  });

  it('exports a plan as CSV with formula-looking text made inert', async () => {
    const id = recipeIds['Glucose syrup DE 95']!;
    await engineer.patch(`/api/recipes/${id}`, { name: '=HYPERLINK("x")' });
    const saved = await engineer.post('/api/plans', planBody());
    const r = await engineer.get(`/api/plans/${saved.body.id}/export.csv`);
    await engineer.patch(`/api/recipes/${id}`, { name: 'Glucose syrup DE 95' });
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toMatch(/text\/csv/);
    expect(r.body).toContain(`content_hash,${saved.body.contentHash}`);
    expect(r.body).toContain(`"'=HYPERLINK(""x"")"`);
    expect(r.body).toMatch(/setpoint_c,\d+\.\d+,degC/);
  });
});
