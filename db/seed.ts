import crypto from 'node:crypto';
import bcrypt from 'bcryptjs';
import { sql } from 'drizzle-orm';
import { batchHours, batchProgram, batchStatus, plannedAt } from '../src/batches';
import { closedBatch, proposeCalibration } from '../src/batches/calibration';
import type { BatchProgram } from '../src/contracts/batches';
import type { CertStability } from '../src/contracts/lots';
import type { LotFit } from '../src/contracts/recipes';
import { createRng, KELVIN_OFFSET, R, simulate } from '../src/model';
import { fitAssay } from '../src/assay-fit';
import { certKdPerH } from '../src/stability';
import type { Role } from '../src/contracts/roles';
import { first, returned, writeTx, type Db } from './client';
import { assayPoints, assays, batchReadings, batches, calibrations, enzymes, invoices, lots, recipes, sites, subscriptions, users, vessels } from './tables';

// An invented plant for demos and tests. Names, suppliers, lots and figures are made up.

export const DEMO_USERS: { role: Role; email: string; name: string; password: string }[] = [
  { role: 'admin', email: 'admin@haldenbay.test', name: 'Ines Varga', password: 'demo-admin-26' },
  { role: 'engineer', email: 'engineer@haldenbay.test', name: 'Tomasz Ekwueme', password: 'demo-engineer-26' },
  { role: 'supervisor', email: 'supervisor@haldenbay.test', name: 'Marit Oyelaran', password: 'demo-supervisor-26' },
  { role: 'procurement', email: 'procurement@haldenbay.test', name: 'Rafael Lindqvist', password: 'demo-procurement-26' },
  { role: 'operator', email: 'operator@haldenbay.test', name: 'Sunniva Achebe', password: 'demo-operator-26' },
];

const ENZYMES = [
  {
    name: 'Amylo GA-17',
    enzymeClass: 'Glucoamylase',
    ecNumber: '3.2.1.3',
    supplier: 'Corvane Biocatalysts',
    activityUnit: 'GAU/g',
    unitDefinition: '1 GAU releases 1 g glucose per hour from 4 % soluble starch at pH 4.3 and 60 °C',
    tRefC: 60,
    eaKJPerMol: 55,
    specTempC: 60,
    specMinHalfLifeH: 20,
    specMinActivity: 400,
  },
  {
    name: 'Thermo AA-90',
    enzymeClass: 'Alpha-amylase',
    ecNumber: '3.2.1.1',
    supplier: 'Tessaly Bioworks',
    activityUnit: 'AAU/g',
    unitDefinition: '1 AAU dextrinises 1 mg starch per minute at pH 6.0 and 85 °C',
    tRefC: 85,
    eaKJPerMol: 45,
    specTempC: 85,
    specMinHalfLifeH: 3,
    specMinActivity: 1200,
  },
  {
    name: 'Lacta LX-5',
    enzymeClass: 'Beta-galactosidase (lactase)',
    ecNumber: '3.2.1.23',
    supplier: 'Oakhurst Ferments',
    activityUnit: 'BGU/mL',
    unitDefinition: '1 BGU releases 1 µmol o-nitrophenol per minute from ONPG at pH 6.5 and 37 °C',
    tRefC: 40,
    eaKJPerMol: 40,
    specTempC: 40,
    specMinHalfLifeH: 48,
    specMinActivity: 5000,
  },
  {
    name: 'Lipo LP-3',
    enzymeClass: 'Triacylglycerol lipase',
    ecNumber: '3.1.1.3',
    supplier: 'Corvane Biocatalysts',
    activityUnit: 'LPU/g',
    unitDefinition: '1 LPU releases 1 µmol butyric acid per minute from tributyrin at pH 7.0 and 30 °C',
    tRefC: 45,
    eaKJPerMol: 35,
    specTempC: 45,
    specMinHalfLifeH: 30,
    specMinActivity: 250,
  },
];

// `qc`: the invented truth behind the lot's QC assay (half-life at the specification temperature, Ed); none = no assay yet.
type SeedLot = {
  enzyme: string;
  lotCode: string;
  receivedOn: string;
  expiresOn: string;
  quantityKg: number;
  certActivity: number;
  certStability: CertStability;
  status?: 'accepted' | 'rejected';
  reason?: string;
  qc?: { halfLifeH: number; edKJPerMol: number; seed: number; asPercent?: boolean };
};

const LOTS: SeedLot[] = [
  {
    enzyme: 'Amylo GA-17',
    lotCode: 'CGA-2605-11',
    receivedOn: '2026-05-14',
    expiresOn: '2027-05-13',
    quantityKg: 800,
    certActivity: 452,
    certStability: { form: 'halfLife', tempC: 60, halfLifeH: 26 },
    status: 'accepted',
    reason: 'Half-life 26 h at 60 °C meets the 20 h specification',
    qc: { halfLifeH: 27, edKJPerMol: 300, seed: 11 },
  },
  {
    enzyme: 'Amylo GA-17',
    lotCode: 'CGA-2608-03',
    receivedOn: '2026-08-21',
    expiresOn: '2027-08-20',
    quantityKg: 800,
    certActivity: 447,
    certStability: { form: 'halfLife', tempC: 60, halfLifeH: 24 },
    status: 'accepted',
    reason: 'Half-life 24 h at 60 °C meets the 20 h specification',
    qc: { halfLifeH: 25, edKJPerMol: 290, seed: 12, asPercent: true },
  },
  {
    enzyme: 'Amylo GA-17',
    lotCode: 'CGA-2611-07',
    receivedOn: '2026-11-18',
    expiresOn: '2027-11-17',
    quantityKg: 1000,
    certActivity: 431,
    certStability: { form: 'residual', tempC: 60, minutes: 480, residualFraction: 0.78 },
    qc: { halfLifeH: 23, edKJPerMol: 305, seed: 13 },
  },
  {
    enzyme: 'Thermo AA-90',
    lotCode: 'TAA-4471',
    receivedOn: '2026-07-02',
    expiresOn: '2027-07-01',
    quantityKg: 250,
    certActivity: 1310,
    certStability: { form: 'dValue', tempC: 85, dMinutes: 660, zC: 9.5 },
    status: 'accepted',
    reason: 'D-value 11 h at 85 °C gives a 3.3 h half-life, above 3 h',
    qc: { halfLifeH: 3.6, edKJPerMol: 260, seed: 21 },
  },
  {
    enzyme: 'Thermo AA-90',
    lotCode: 'TAA-4519',
    receivedOn: '2026-10-09',
    expiresOn: '2027-10-08',
    quantityKg: 250,
    certActivity: 1275,
    certStability: { form: 'dValue', tempC: 85, dMinutes: 540, zC: 9.5 },
    qc: { halfLifeH: 2.3, edKJPerMol: 255, seed: 22, asPercent: true },
  },
  {
    enzyme: 'Thermo AA-90',
    lotCode: 'TAA-4522',
    receivedOn: '2026-11-24',
    expiresOn: '2027-11-23',
    quantityKg: 250,
    certActivity: 1290,
    certStability: { form: 'halfLife', tempC: 85, halfLifeH: 3.4 },
    qc: { halfLifeH: 3.9, edKJPerMol: 265, seed: 23 },
  },
  {
    enzyme: 'Lacta LX-5',
    lotCode: 'OF-LX5-0926',
    receivedOn: '2026-09-26',
    expiresOn: '2027-03-25',
    quantityKg: 120,
    certActivity: 5400,
    certStability: { form: 'halfLife', tempC: 40, halfLifeH: 60 },
    status: 'accepted',
    reason: 'Half-life 60 h at 40 °C meets the 48 h specification',
  },
  {
    enzyme: 'Lacta LX-5',
    lotCode: 'OF-LX5-1107',
    receivedOn: '2026-11-07',
    expiresOn: '2027-05-06',
    quantityKg: 120,
    certActivity: 5150,
    certStability: { form: 'residual', tempC: 40, minutes: 1440, residualFraction: 0.69 },
    status: 'rejected',
    reason: 'QC half-life 38 h at 40 °C, below the 48 h specification',
    qc: { halfLifeH: 38, edKJPerMol: 235, seed: 32 },
  },
  {
    enzyme: 'Lacta LX-5',
    lotCode: 'OF-LX5-1128',
    receivedOn: '2026-11-28',
    expiresOn: '2027-05-27',
    quantityKg: 120,
    certActivity: 5320,
    certStability: { form: 'halfLife', tempC: 40, halfLifeH: 55 },
  },
  {
    enzyme: 'Lipo LP-3',
    lotCode: 'CLP-2609-01',
    receivedOn: '2026-09-03',
    expiresOn: '2027-09-02',
    quantityKg: 60,
    certActivity: 268,
    certStability: { form: 'halfLife', tempC: 45, halfLifeH: 40 },
    status: 'accepted',
    reason: 'Half-life 40 h at 45 °C meets the 30 h specification',
    qc: { halfLifeH: 43, edKJPerMol: 210, seed: 41 },
  },
  {
    enzyme: 'Lipo LP-3',
    lotCode: 'CLP-2611-02',
    receivedOn: '2026-11-12',
    expiresOn: '2027-11-11',
    quantityKg: 60,
    certActivity: 259,
    certStability: { form: 'residual', tempC: 45, minutes: 720, residualFraction: 0.82 },
    qc: { halfLifeH: 34, edKJPerMol: 215, seed: 42, asPercent: true },
  },
];

// Invented recipes on the demo vessels, each with an accepted lot. Ed is an invented demo value inside the
// 150-700 kJ/mol range typical of enzyme inactivation (common practice, no source).
const RECIPES = [
  {
    name: 'Glucose syrup DE 95',
    lotCode: 'CGA-2605-11',
    vessel: 'R-101 Saccharifier',
    s0GPerL: 300,
    kmGPerL: 2,
    doseGPerL: 0.6,
    vmaxRefGPerLH: 7.5,
    edKJPerMol: 300,
    batchH: 48,
    turnaroundH: 6,
    fillC: 45,
    productPricePerKg: 0.45,
    enzymePricePerKg: 18,
    heatingCostPerDegCHour: 0.8,
    currentSetpointC: 59,
  },
  {
    name: 'Lactose-free milk base',
    lotCode: 'OF-LX5-0926',
    vessel: 'R-204 Lactose tank',
    s0GPerL: 48,
    kmGPerL: 10,
    doseGPerL: 0.4,
    vmaxRefGPerLH: 2,
    edKJPerMol: 250,
    batchH: 20,
    turnaroundH: 3,
    fillC: 6,
    productPricePerKg: 2.5,
    enzymePricePerKg: 20,
    heatingCostPerDegCHour: 0.05,
    currentSetpointC: 37,
  },
  {
    name: 'Maltodextrin DE 12 liquefaction',
    lotCode: 'TAA-4471',
    vessel: 'R-310 Liquefier',
    s0GPerL: 320,
    kmGPerL: 5,
    doseGPerL: 0.3,
    vmaxRefGPerLH: 120,
    edKJPerMol: 350,
    batchH: 3,
    turnaroundH: 2,
    fillC: 60,
    productPricePerKg: 0.3,
    enzymePricePerKg: 25,
    heatingCostPerDegCHour: 0.6,
    currentSetpointC: 90,
  },
];
const RECIPES_UPDATED_AT = '2026-11-30T09:00:00.000Z';

// Invented batches: one running, the rest closed with a lab result beside the forecast. The glucose ratio to the
// forecast is made up; the lactose batches' lab results come from the invented plant truth below.
type SeedBatch = { recipe: string; startedAt: string; readUntilH: number; closedAt?: string; measuredRatio?: number; setpointC?: number };
const BATCHES: SeedBatch[] = [
  { recipe: 'Lactose-free milk base', startedAt: '2026-11-25T06:00:00.000Z', readUntilH: 20, closedAt: '2026-11-26T02:30:00.000Z' },
  { recipe: 'Glucose syrup DE 95', startedAt: '2026-11-27T05:00:00.000Z', readUntilH: 48, closedAt: '2026-11-29T05:30:00.000Z', measuredRatio: 1.012 },
  { recipe: 'Lactose-free milk base', startedAt: '2026-11-28T06:00:00.000Z', readUntilH: 20, closedAt: '2026-11-29T02:30:00.000Z' },
  { recipe: 'Glucose syrup DE 95', startedAt: '2026-12-01T05:00:00.000Z', readUntilH: 4 },
];

/**
 * The demo's evidence for calibration: lot OF-LX5-0926 (certificate only, no QC assay) is in truth less stable than
 * its certificate's 60 h at 40 °C, and the lactose tank gets a little less of the recipe's Vmax than the bench did.
 * Invented figures. Its lactose batches are closed with lab results simulated from this truth on their logged
 * temperatures, with 2 % seeded noise, so accepting the calibration moves the recommendation and narrows the band.
 */
export const DEMO_PLANT_TRUTH = { lotCode: 'OF-LX5-0926', halfLifeRefH: 38, edKJPerMol: 230, vmaxScale: 0.9, noiseRelSd: 0.02, seed: 926 } as const;
// Setpoints the plant tried on earlier lactose batches (each 20 h, closed 30 min after its end, every third day): invented.
const CALIBRATION_SETPOINTS_C = [34, 36, 40, 42, 35, 41, 38, 39];
for (const [i, setpointC] of CALIBRATION_SETPOINTS_C.entries()) {
  const start = Date.parse('2026-10-27T06:00:00.000Z') + i * 3 * 86_400_000;
  BATCHES.push({
    recipe: 'Lactose-free milk base',
    startedAt: new Date(start).toISOString(),
    readUntilH: 20,
    closedAt: new Date(start + 20.5 * 3_600_000).toISOString(),
    setpointC,
  });
}

/** Half-hourly readings near the plan with a deterministic wobble of a few tenths of a degree. */
function demoReadings(program: Parameters<typeof plannedAt>[0], startedAt: string, untilH: number): { takenAt: string; c: number }[] {
  const out: { takenAt: string; c: number }[] = [];
  for (let i = 0; i * 0.5 <= untilH; i++) {
    const h = i * 0.5;
    const c = plannedAt(program, h) + 0.35 * Math.sin(1.7 * i) + 0.2 * Math.cos(0.9 * i);
    out.push({ takenAt: new Date(Date.parse(startedAt) + h * 3_600_000).toISOString(), c: Math.round(c * 10) / 10 });
  }
  return out;
}

/**
 * Invented QC measurements: first-order decay at the specification temperature and 4 and 8 °C above it, sampled
 * out to about 1.3 half-lives at each, with 5 % multiplicative noise from a seeded generator. Same seed, same rows.
 */
export function demoAssayPoints(specTempC: number, qc: { halfLifeH: number; edKJPerMol: number; seed: number }) {
  const rng = createRng(qc.seed);
  const kdSpec = Math.LN2 / qc.halfLifeH;
  const points: { tempC: number; timeH: number; residual: number }[] = [];
  for (const tempC of [specTempC, specTempC + 4, specTempC + 8]) {
    const kd = kdSpec * Math.exp(((qc.edKJPerMol * 1000) / R) * (1 / (specTempC + KELVIN_OFFSET) - 1 / (tempC + KELVIN_OFFSET)));
    const step = (1 / kd) * 0.18;
    // Round sampling times the way a lab would (to 0.1 h below 5 h, else to 0.5 h).
    const round = (h: number) => (step < 5 ? Math.round(h * 10) / 10 : Math.round(h * 2) / 2);
    for (let i = 0; i <= 6; i++) {
      const timeH = round(i * step);
      const noise = i === 0 ? 1 : Math.exp(0.05 * rng.normal());
      points.push({ tempC, timeH, residual: Math.round(Math.exp(-kd * timeH) * noise * 1000) / 1000 });
    }
  }
  return points;
}

/** The demo points as the CSV a lab would send (per cent when `asPercent`). */
export function demoAssayCsv(points: { tempC: number; timeH: number; residual: number }[], asPercent = false): string {
  const head = asPercent ? 'temperature_c,time_h,residual_activity_percent' : 'temperature_c,time_h,residual_activity_fraction';
  return [head, ...points.map((p) => `${p.tempC},${p.timeH},${asPercent ? Math.round(p.residual * 1000) / 10 : p.residual}`)].join('\n') + '\n';
}

/** The lab result the invented plant truth gives for a batch's logged temperatures, g/L. */
function plantTruthProduct(program: BatchProgram, logged: { h: number; c: number }[], tRefC: number): number {
  const t = DEMO_PLANT_TRUTH;
  const enzyme = {
    ...program.enzyme,
    tRefC,
    kdRefPerH: Math.LN2 / t.halfLifeRefH,
    edKJPerMol: t.edKJPerMol,
    vmaxRef: (program.enzyme.vmaxRef / (program.evidence?.vmaxScale ?? 1)) * t.vmaxScale,
  };
  return simulate(enzyme, program.substrate, program.batchH, { log: logged }).productGPerL;
}

/**
 * The proposal an engineer finds waiting: the same computation as a batch's close (the lot's certificate as prior,
 * the recipe and lot's closed batches), stored as proposed; nothing plans with it until it is accepted. Two earlier
 * proposals (after 4 and 7 batches) stand superseded, as each close proposes anew.
 */
async function proposeDemoCalibration(tx: Pick<Db, 'select' | 'insert'>, siteId: number, recipe: typeof recipes.$inferSelect): Promise<void> {
  const lot = (await tx
    .select()
    .from(lots)
    .where(sql`${lots.id} = ${recipe.lotId}`)
    .then(first))!;
  const enzyme = (await tx
    .select()
    .from(enzymes)
    .where(sql`${enzymes.id} = ${recipe.enzymeId}`)
    .then(first))!;
  const assay = await tx
    .select()
    .from(assays)
    .where(sql`${assays.lotId} = ${lot.id}`)
    .then(first);
  // One query after the other: a transaction is one connection (PostgreSQL answers its queries in turn anyway).
  const closed = [];
  for (const b of await tx
    .select()
    .from(batches)
    .where(sql`${batches.recipeId} = ${recipe.id} and ${batches.lotId} = ${lot.id} and ${batches.state} = 'closed'`)
    .orderBy(batches.closedAt, batches.id))
    closed.push(
      closedBatch(
        b,
        await tx
          .select({ takenAt: batchReadings.takenAt, c: batchReadings.c })
          .from(batchReadings)
          .where(sql`${batchReadings.batchId} = ${b.id}`)
          .orderBy(batchReadings.takenAt, batchReadings.id),
      ),
    );
  const evidence = {
    certKdPerH: lot.certKdPerH,
    certTempC: lot.certTempC,
    fit: assay?.fit ? { assayId: assay.id, createdAt: assay.createdAt, fit: assay.fit } : null,
  };
  for (const n of [4, 7, closed.length]) {
    const used = closed.slice(0, n);
    const proposal = proposeCalibration({ recipe, enzyme, lot: evidence, batches: used, excluded: [] });
    if (!proposal) continue;
    const state = n === closed.length ? 'proposed' : 'superseded';
    await tx
      .insert(calibrations)
      .values({ siteId, recipeId: recipe.id, lotId: lot.id, state, batchIds: proposal.batchIds, result: proposal.result, createdAt: used.at(-1)!.closedAt })
      .execute();
  }
}

export const DEMO_SITE_NAME = 'Halden Bay Biorefinery';

/** The demo licence: 8 seats (the 5 demo users take 5), monthly, with three paid invoices (the last the current period's). Invented. */
export const DEMO_SEATS = 8;
const DEMO_SEAT_CENTS = 4900;
// Random per seed: a guessable customer id is what a forged payment event names to reach a site.
const demoStripeIds = () => {
  const tag = crypto.randomBytes(12).toString('base64url');
  return { customer: `cus_demo_${tag}`, subscription: `sub_demo_${tag}`, item: `si_demo_${tag}` };
};
const DEMO_INVOICES = [
  { number: 'YP-DEMO-0001', periodStart: '2026-10-01T00:00:00.000Z', periodEnd: '2026-11-01T00:00:00.000Z' },
  { number: 'YP-DEMO-0002', periodStart: '2026-11-01T00:00:00.000Z', periodEnd: '2026-12-01T00:00:00.000Z' },
  // The current period's, billed at its start like the others.
  { number: 'YP-DEMO-0003', periodStart: '2026-12-01T00:00:00.000Z', periodEnd: '2027-01-01T00:00:00.000Z' },
];

/** True when the database has no site yet. */
export const isEmpty = async (db: Db) =>
  ((
    await db
      .select({ n: sql<number>`count(*)`.mapWith(Number) })
      .from(sites)
      .then(first)
  )?.n ?? 0) === 0;

/**
 * Writes the demo site in one transaction. Deterministic: the same rows every time, except bcrypt salts.
 * `bcryptCost` is lowered only by tests that seed many databases.
 */
/**
 * `now`: the running batch starts four hours before it (on the half hour) with its readings up to then, so the
 * demo's floor screens look like a live shift on any day. Without it (the tests) every date is the fixed one above.
 */
export async function seedDemo(db: Db, opts: { bcryptCost?: number; siteName?: string; emailDomain?: string; now?: Date } = {}): Promise<{ siteId: number }> {
  const cost = opts.bcryptCost ?? 12;
  const hashes = DEMO_USERS.map((u) => bcrypt.hashSync(u.password, cost));
  return await writeTx(db, async (tx) => {
    const site = await tx
      .insert(sites)
      .values({ name: opts.siteName ?? DEMO_SITE_NAME, timeZone: 'Europe/Berlin' })
      .returning()
      .then(returned);
    const domain = opts.emailDomain ?? 'haldenbay.test';
    const userIds = new Map<Role, number>();
    for (const [i, u] of DEMO_USERS.entries()) {
      const row = await tx
        .insert(users)
        .values({ siteId: site.id, email: u.email.replace('haldenbay.test', domain), name: u.name, role: u.role, passwordHash: hashes[i]! })
        .returning()
        .then(returned);
      userIds.set(u.role, row.id);
    }
    const vesselRows = await tx
      .insert(vessels)
      .values([
        { siteId: site.id, name: 'R-101 Saccharifier', workingVolumeL: 40000, minC: 20, maxC: 75, maxHeatCPerH: 12, maxCoolCPerH: 8, hygienicMinC: 50 },
        { siteId: site.id, name: 'R-204 Lactose tank', workingVolumeL: 12000, minC: 4, maxC: 60, maxHeatCPerH: 10, maxCoolCPerH: 6, hygienicMinC: 8 },
        { siteId: site.id, name: 'R-310 Liquefier', workingVolumeL: 8000, minC: 20, maxC: 105, maxHeatCPerH: 30, maxCoolCPerH: 20, hygienicMinC: 45 },
      ])
      .returning()
      .execute();
    const enzymeIds = new Map<string, number>();
    for (const e of ENZYMES)
      enzymeIds.set(
        e.name,
        (
          await tx
            .insert(enzymes)
            .values({ ...e, siteId: site.id })
            .returning()
            .then(returned)
        ).id,
      );
    const lotRows = new Map<string, { id: number; enzymeId: number }>();
    // Each lot's assay fit, so the demo's batch programs plan from it as the app's own do (else the certificate).
    const lotFits = new Map<number, LotFit>();
    for (const l of LOTS) {
      const lot = await tx
        .insert(lots)
        .values({
          siteId: site.id,
          enzymeId: enzymeIds.get(l.enzyme)!,
          lotCode: l.lotCode,
          receivedOn: l.receivedOn,
          expiresOn: l.expiresOn,
          quantityKg: l.quantityKg,
          certActivity: l.certActivity,
          certStability: l.certStability,
          certKdPerH: certKdPerH(l.certStability),
          certTempC: l.certStability.tempC,
          status: l.status ?? 'quarantined',
          decisionReason: l.reason ?? null,
          decidedAt: l.status ? `${l.receivedOn}T12:00:00.000Z` : null,
          decidedBy: l.status ? userIds.get('procurement')! : null,
        })
        .returning()
        .then(returned);
      lotRows.set(l.lotCode, lot);
      if (!l.qc) continue;
      const enzyme = ENZYMES.find((e) => e.name === l.enzyme)!;
      const points = demoAssayPoints(enzyme.specTempC, l.qc);
      const result = fitAssay(
        enzyme.tRefC,
        points.map((p) => ({ c: p.tempC, h: p.timeH, residual: p.residual })),
      );
      const assay = await tx
        .insert(assays)
        .values({
          siteId: site.id,
          lotId: lot.id,
          source: 'csv',
          fileName: `${l.lotCode}-qc.csv`,
          scale: l.qc.asPercent ? 'percent' : 'fraction',
          scaleNote: l.qc.asPercent
            ? 'Residual activity read as per cent: the column header says so.'
            : 'Residual activity read as fractions of the activity at time 0: every value is 1.5 or below.',
          fit: result.fit,
          fitProblem: result.problem,
          pointCount: points.length,
          createdBy: userIds.get('engineer')!,
          createdAt: `${l.receivedOn}T10:00:00.000Z`,
        })
        .returning()
        .then(returned);
      if (result.fit) lotFits.set(lot.id, { assayId: assay.id, createdAt: assay.createdAt, fit: result.fit });
      await tx
        .insert(assayPoints)
        .values(points.map((p, i) => ({ ...p, assayId: assay.id, line: i + 2, note: null })))
        .execute();
    }
    const recipeRows = new Map<string, typeof recipes.$inferSelect>();
    for (const { lotCode, vessel, ...r } of RECIPES) {
      const lot = lotRows.get(lotCode)!;
      const vesselId = vesselRows.find((v) => v.name === vessel)!.id;
      recipeRows.set(
        r.name,
        await tx
          .insert(recipes)
          .values({ ...r, siteId: site.id, enzymeId: lot.enzymeId, lotId: lot.id, vesselId, updatedAt: RECIPES_UPDATED_AT })
          .returning()
          .then(returned),
      );
    }
    const truthRng = createRng(DEMO_PLANT_TRUTH.seed);
    const sorted = [...BATCHES].sort((a, b) => a.startedAt.localeCompare(b.startedAt));
    for (const demo of sorted) {
      const b =
        !demo.closedAt && opts.now
          ? { ...demo, startedAt: new Date(Math.floor(opts.now.getTime() / 1_800_000) * 1_800_000 - demo.readUntilH * 3_600_000).toISOString() }
          : demo;
      const saved = recipeRows.get(b.recipe)!;
      const recipe = b.setpointC === undefined ? saved : { ...saved, currentSetpointC: b.setpointC };
      const vessel = vesselRows.find((v) => v.id === recipe.vesselId)!;
      const lot = (await tx
        .select()
        .from(lots)
        .where(sql`${lots.id} = ${recipe.lotId}`)
        .then(first))!;
      const enzyme = (await tx
        .select()
        .from(enzymes)
        .where(sql`${enzymes.id} = ${recipe.enzymeId}`)
        .then(first))!;
      const program = batchProgram({ recipe, enzyme, lot: { ...lot, fit: lotFits.get(lot.id) ?? null }, vessel, plan: null });
      const row = await tx
        .insert(batches)
        .values({
          siteId: site.id,
          recipeId: recipe.id,
          vesselId: vessel.id,
          lotId: lot.id,
          planId: null,
          source: program.source,
          program,
          state: 'running',
          startedAt: b.startedAt,
          startedBy: userIds.get('supervisor')!,
        })
        .returning()
        .then(returned);
      const readings = demoReadings(program, b.startedAt, b.readUntilH);
      await tx
        .insert(batchReadings)
        .values(
          readings.map((r, i) => ({
            siteId: site.id,
            batchId: row.id,
            clientKey: `demo-${row.id}-${i}`,
            takenAt: r.takenAt,
            c: r.c,
            note: null,
            source: 'manual' as const,
            enteredBy: userIds.get('operator')!,
            receivedAt: r.takenAt,
          })),
        )
        .execute();
      if (b.closedAt) {
        const logged = readings.map((r) => ({ h: batchHours(b.startedAt, r.takenAt), c: r.c }));
        const forecast = batchStatus(program, logged, program.batchH).forecastGPerL;
        const measured =
          lot.lotCode === DEMO_PLANT_TRUTH.lotCode
            ? plantTruthProduct(program, logged, enzyme.tRefC) * Math.exp(DEMO_PLANT_TRUTH.noiseRelSd * truthRng.normal())
            : forecast * (b.measuredRatio ?? 1);
        await tx
          .update(batches)
          .set({
            state: 'closed',
            closedAt: b.closedAt,
            closedBy: userIds.get('supervisor')!,
            measuredProductGPerL: Math.round(measured * 10) / 10,
            forecastAtCloseGPerL: forecast,
            closeComment: 'Lab result from the end-of-batch sample',
          })
          .where(sql`${batches.id} = ${row.id}`)
          .execute();
      }
    }
    await proposeDemoCalibration(tx, site.id, recipeRows.get('Lactose-free milk base')!);
    const ids = demoStripeIds();
    await tx
      .insert(subscriptions)
      .values({
        siteId: site.id,
        plan: 'Per seat, billed monthly',
        seats: DEMO_SEATS,
        status: 'active',
        currentPeriodEnd: '2027-01-01T00:00:00.000Z',
        stripeCustomerId: ids.customer,
        stripeSubscriptionId: ids.subscription,
        stripeItemId: ids.item,
        updatedAt: '2026-12-01T00:00:00.000Z',
      })
      .execute();
    for (const [i, inv] of DEMO_INVOICES.entries()) {
      await tx
        .insert(invoices)
        .values({
          siteId: site.id,
          stripeInvoiceId: `in_demo_site${site.id}_${i + 1}`,
          number: inv.number,
          status: 'paid',
          currency: 'eur',
          amountDueCents: DEMO_SEATS * DEMO_SEAT_CENTS,
          amountPaidCents: DEMO_SEATS * DEMO_SEAT_CENTS,
          seats: DEMO_SEATS,
          periodStart: inv.periodStart,
          periodEnd: inv.periodEnd,
          hostedUrl: null,
          issuedAt: inv.periodStart,
        })
        .execute();
    }
    return { siteId: site.id };
  });
}
