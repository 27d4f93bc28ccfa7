import { rowCount } from '../support/raw-sql';
import crypto from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoAssayCsv, demoAssayPoints } from '../../db/seed';
import { listAudit } from '../../server/repositories/audit';
import { verifyAudit } from '../../server/services/audit-verify';
import { ROLES, type Role } from '../../src/contracts/roles';
import { startTestApp, type Client, type Reply, type TestApp } from './harness';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

/** A multipart upload of one file the way the browser sends it. */
async function upload(c: Client, path: string, name: string, bytes: Buffer | string, type = 'application/octet-stream'): Promise<Reply> {
  const form = new FormData();
  form.append('file', new Blob([typeof bytes === 'string' ? bytes : new Uint8Array(bytes)], { type }), name);
  const res = await fetch(t.base + path, { method: 'POST', headers: { 'x-yieldpoint-client': 'test', cookie: c.cookie ?? '' }, body: form });
  const text = await res.text();
  let body: unknown = text;
  try {
    body = JSON.parse(text);
  } catch {
    /* not JSON */
  }
  return { status: res.status, body, headers: res.headers };
}

const lotId = async (c: Client, code: string) =>
  ((await c.get('/api/lots')).body.lots as { id: number; lotCode: string }[]).find((l) => l.lotCode === code)!.id;
const enzymeId = async (c: Client, name: string) => (await c.get(`/api/enzymes?q=${encodeURIComponent(name)}`)).body.enzymes[0].id as number;
const pointCount = () => rowCount(t.db, 'assay_points');

const PDF = Buffer.concat([Buffer.from('%PDF-1.7\n'), Buffer.alloc(2000, 0x20), Buffer.from('\n%%EOF\n')]);
const PNG = Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), Buffer.alloc(100, 1)]);

describe('registering lots', () => {
  const input = (enzymeIdValue: number, lotCode: string, certStability: unknown) => ({
    enzymeId: enzymeIdValue,
    lotCode,
    receivedOn: '2026-12-01',
    expiresOn: '2027-12-01',
    quantityKg: 500,
    certActivity: 440,
    certStability,
  });

  it('converts each certificate form to kd at its temperature; new lots start quarantined', async () => {
    const c = await t.signIn('procurement');
    const ga = await enzymeId(c, 'Amylo');
    const cases = [
      // Check values [C] from t½ = ln2/kd and D = ln10/kd (docs/science table rows 5 and 8 use the same definitions).
      { form: { form: 'halfLife', tempC: 60, halfLifeH: 10 }, kd: Math.LN2 / 10 },
      { form: { form: 'residual', tempC: 60, minutes: 120, residualFraction: 0.5 }, kd: Math.LN2 / 2 },
      { form: { form: 'dValue', tempC: 70, dMinutes: 6.5, zC: 16.52 }, kd: (Math.LN10 / 6.5) * 60 },
    ];
    for (const [i, k] of cases.entries()) {
      const r = await c.post('/api/lots', input(ga, `NEW-${i}`, k.form));
      expect(r.status).toBe(201);
      expect(r.body.status).toBe('quarantined');
      expect(r.body.certKdPerH).toBeCloseTo(k.kd, 10);
    }
    const d = await c.get(`/api/lots/${await lotId(c, 'NEW-2')}`);
    // Broccoli peroxidase D = 6.5 min at 70 °C, z 16.52 °C: kd(70 °C) 0.354 /min = 21.26 /h and Ed 144 kJ/mol
    // ([V] Goncalves et al., J Agric Food Chem 57:5370-5375 (2009) for the D-values; [C] in docs/science check value 8).
    expect(d.body.conversion.kdPerH / 60).toBeCloseTo(0.354, 3);
    // Ed from z over the pair (T, T + z): ln10 · 8.314462618 · 343.15 · 359.67 / 16.52 = 143.03 kJ/mol [C]; the
    // science notes' 144 kJ/mol takes the 70 and 90 °C pair of the same paper, 0.7 % away.
    expect(d.body.conversion.edKJPerMol).toBeCloseTo(143.03, 1);
    expect(Math.abs(d.body.conversion.edKJPerMol / 144 - 1)).toBeLessThan(0.01);
    expect(d.body.conversion.steps.join(' ')).toMatch(/ln 10 \/ D/);
    const created = (await listAudit(t.db, 1)).filter((e) => e.action === 'lot.create');
    expect(created).toHaveLength(3);
  });

  it('refuses wrong types, missing fields, bad dates and an unknown or foreign enzyme, storing nothing', async () => {
    const c = await t.signIn('engineer');
    const before = (await c.get('/api/lots')).body.lots.length;
    const ga = await enzymeId(c, 'Amylo');
    const bad = await c.post('/api/lots', {
      ...input(ga, 'X', { form: 'residual', tempC: 60, minutes: 60, residualFraction: 78 }),
      quantityKg: '500',
      receivedOn: '2026-13-01',
    });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['certStability.residualFraction', 'quantityKg', 'receivedOn']);
    const noForm = await c.post('/api/lots', input(ga, 'X', { form: 'guess', tempC: 60 }));
    expect(noForm.status).toBe(400);
    const backwards = await c.post('/api/lots', { ...input(ga, 'X', { form: 'halfLife', tempC: 60, halfLifeH: 9 }), expiresOn: '2025-01-01' });
    expect(backwards.body.error.fields.expiresOn).toMatch(/after/);
    const otherEnzyme = await enzymeId(await t.signIn('engineer', 'other'), 'Amylo');
    const foreign = await c.post('/api/lots', input(otherEnzyme, 'X', { form: 'halfLife', tempC: 60, halfLifeH: 9 }));
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.fields.enzymeId).toBeTruthy();
    const dup = await c.post('/api/lots', input(ga, 'CGA-2605-11', { form: 'halfLife', tempC: 60, halfLifeH: 9 }));
    expect(dup.status).toBe(409);
    expect((await c.get('/api/lots')).body.lots.length).toBe(before);
  });

  it('lets only procurement, engineers and admins register', async () => {
    for (const role of ['supervisor', 'operator'] as Role[]) {
      const c = await t.signIn(role);
      const r = await c.post('/api/lots', input(1, `R-${role}`, { form: 'halfLife', tempC: 60, halfLifeH: 9 }));
      expect(r.status).toBe(403);
    }
  });

  it("filters by status and enzyme, and hides other sites' lots (404)", async () => {
    const c = await t.signIn('operator');
    const accepted = (await c.get('/api/lots?status=accepted')).body.lots as { status: string }[];
    expect(accepted.length).toBe(5);
    expect(accepted.every((l) => l.status === 'accepted')).toBe(true);
    expect((await c.get('/api/lots?status=maybe')).status).toBe(400);
    const other = await t.signIn('operator', 'other');
    expect((await other.get(`/api/lots/${await lotId(c, 'TAA-4519')}`)).status).toBe(404);
  });
});

describe('certificate of analysis', () => {
  it('stores a PDF with its SHA-256 and gives the same bytes back', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'TAA-4522');
    const r = await upload(c, `/api/lots/${id}/certificate`, 'coa TAA-4522.pdf', PDF, 'application/pdf');
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject({ mimeType: 'application/pdf', sizeBytes: PDF.length, fileName: 'coa TAA-4522.pdf' });
    expect(r.body.sha256).toBe(crypto.createHash('sha256').update(PDF).digest('hex'));
    expect((await listAudit(t.db, 1)).at(-1)!.action).toBe('lot.certificate.upload');
    const reader = await t.signIn('operator');
    const res = await fetch(`${t.base}/api/lots/${id}/certificate`, { headers: { cookie: reader.cookie! } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/pdf');
    expect(res.headers.get('content-disposition')).toContain('attachment');
    expect(Buffer.from(await res.arrayBuffer()).equals(PDF)).toBe(true);
    expect((await c.get(`/api/lots/${id}`)).body.certificate.sha256).toBe(r.body.sha256);
  });

  it('takes a PNG, and refuses a text file renamed .pdf, a PNG named .pdf, an empty file and no file', async () => {
    const c = await t.signIn('engineer');
    const id = await lotId(c, 'CLP-2611-02');
    expect((await upload(c, `/api/lots/${id}/certificate`, 'scan.png', PNG, 'image/png')).status).toBe(201);
    const renamed = await upload(c, `/api/lots/${id}/certificate`, 'coa.pdf', 'MZ this is not a pdf at all', 'application/pdf');
    expect(renamed.status).toBe(415);
    expect(renamed.body.error.message).toMatch(/named PDF but its content is not one/);
    const mismatch = await upload(c, `/api/lots/${id}/certificate`, 'coa.pdf', PNG, 'application/pdf');
    expect(mismatch.status).toBe(415);
    expect((await upload(c, `/api/lots/${id}/certificate`, 'empty.pdf', Buffer.alloc(0))).status).toBe(400);
    expect((await c.post(`/api/lots/${id}/certificate`, {})).status).toBe(400);
    expect((await c.get(`/api/lots/${id}`)).body.certificate.mimeType).toBe('image/png');
  });

  it('refuses a 20 MB certificate with 413 and keeps the earlier one', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'TAA-4522');
    const big = Buffer.concat([Buffer.from('%PDF-1.7\n'), Buffer.alloc(20 * 1024 * 1024, 0x20)]);
    const r = await upload(c, `/api/lots/${id}/certificate`, 'big.pdf', big, 'application/pdf');
    expect(r.status).toBe(413);
    expect(r.body.error.message).toMatch(/10 MB/);
    expect((await c.get(`/api/lots/${id}`)).body.certificate.fileName).toBe('coa TAA-4522.pdf');
  });

  it('answers 404 for a lot without a certificate and for another site', async () => {
    const c = await t.signIn('procurement');
    expect((await c.get(`/api/lots/${await lotId(c, 'CGA-2611-07')}/certificate`)).status).toBe(404);
    const other = await t.signIn('procurement', 'other');
    expect((await upload(other, `/api/lots/${await lotId(c, 'TAA-4522')}/certificate`, 'x.pdf', PDF)).status).toBe(404);
    expect((await other.get(`/api/lots/${await lotId(c, 'TAA-4522')}/certificate`)).status).toBe(404);
  });
});

describe('assays', () => {
  // Invented demo parameters: half-life 60 h at 40 °C, Ed 240 kJ/mol (the seed's generator, seeded noise).
  const points = demoAssayPoints(40, { halfLifeH: 60, edKJPerMol: 240, seed: 7 });

  it('fits an uploaded CSV, says it read fractions, and reports the half-life at spec temperature with its interval', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'OF-LX5-1128');
    const before = (await c.get(`/api/lots/${id}`)).body;
    expect(before.assays).toEqual([]);
    expect(before.evaluation.basis).toBe('certificate');
    const r = await upload(c, `/api/lots/${id}/assays`, 'qc.csv', demoAssayCsv(points), 'text/csv');
    expect(r.status).toBe(201);
    expect(r.body.scale).toBe('fraction');
    expect(r.body.scaleNote).toMatch(/fractions/);
    expect(r.body.pointCount).toBe(points.length);
    const est = r.body.atSpec;
    expect(est.lowerH).toBeLessThan(est.halfLifeH);
    expect(est.upperH).toBeGreaterThan(est.halfLifeH);
    // 5 % noise on 21 points: the fit lands within 15 % of the invented 60 h.
    expect(Math.abs(est.halfLifeH / 60 - 1)).toBeLessThan(0.15);
    expect((await listAudit(t.db, 1)).at(-1)!.action).toBe('assay.create');
    const after = (await c.get(`/api/lots/${id}`)).body;
    expect(after.evaluation).toMatchObject({ basis: 'assay', comparedH: est.lowerH, recommendation: 'accept' });
  });

  it('reads per cent when the header says so, converts to fractions, and refuses a file that names no unit', async () => {
    const c = await t.signIn('engineer');
    const id = await lotId(c, 'OF-LX5-1128');
    const unnamed = await upload(
      c,
      `/api/lots/${id}/assays`,
      'qc-pct.csv',
      demoAssayCsv(points, true).replace('residual_activity_percent', 'remaining activity'),
      'text/csv',
    );
    expect([unnamed.status, unnamed.body.error.code]).toEqual([400, 'scale_missing']);
    const r = await upload(c, `/api/lots/${id}/assays`, 'qc-pct.csv', demoAssayCsv(points, true), 'text/csv');
    expect(r.status).toBe(201);
    expect(r.body.scale).toBe('percent');
    expect(r.body.scaleNote).toMatch(/header says so/);
    expect(Math.max(...r.body.points.map((p: { residual: number }) => p.residual))).toBeLessThanOrEqual(1);
  });

  it('takes the editable table as JSON, with a chosen scale', async () => {
    const c = await t.signIn('admin');
    const id = await lotId(c, 'CGA-2611-07');
    const rows = [
      { tempC: 60, timeH: 0, residual: 100 },
      { tempC: 60, timeH: 10, residual: 74 },
      { tempC: 64, timeH: 0, residual: 100 },
      { tempC: 64, timeH: 5, residual: 62 },
    ];
    const r = await c.post(`/api/lots/${id}/assays`, { rows, scale: 'percent' });
    expect(r.status).toBe(201);
    expect(r.body.source).toBe('table');
    expect(r.body.points[1].residual).toBeCloseTo(0.74, 12);
  });

  it('keeps a fit problem in words rather than failing when the data cannot be fitted', async () => {
    const c = await t.signIn('admin');
    const id = await lotId(c, 'CGA-2611-07');
    const r = await c.post(`/api/lots/${id}/assays`, {
      rows: [
        { tempC: 60, timeH: 0, residual: 1 },
        { tempC: 60, timeH: 4, residual: 0.9 },
        { tempC: 60, timeH: 8, residual: 0.8 },
      ],
    });
    expect(r.status).toBe(201);
    expect(r.body.fit).toBeNull();
    expect(r.body.fitProblem).toMatch(/two temperatures/);
  });

  it('reports bad rows by line number and reason and saves nothing', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'CLP-2611-02');
    const n0 = await pointCount();
    const csv = 'temperature_c,time_h,residual_activity_fraction\n45,0,1\n45,abc,0.9\n\n318,2,0.8\n45,4,0\n45,6,-0.1\n';
    const r = await upload(c, `/api/lots/${id}/assays`, 'bad.csv', csv, 'text/csv');
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('invalid_rows');
    expect(r.body.error.message).toMatch(/4 rows have problems; nothing was saved/);
    expect(r.body.error.fields).toEqual({
      'line 3': 'time "abc" is not a number',
      'line 5': 'temperature 318 °C is outside -20 to 150 °C (kelvin?)',
      'line 6': 'residual activity must be above 0 (a log fit cannot use 0)',
      'line 7': 'residual activity must be above 0 (a log fit cannot use 0)',
    });
    expect(await pointCount()).toBe(n0);
  });

  it('names missing columns, and refuses wrong JSON types', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'CLP-2611-02');
    const r = await upload(c, `/api/lots/${id}/assays`, 'cols.csv', 'temp,residual\n45,1\n', 'text/csv');
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('missing_columns');
    expect(r.body.error.message).toMatch(/time \(h\)/);
    const wrong = await c.post(`/api/lots/${id}/assays`, { rows: [{ tempC: true, timeH: 1, residual: 0.5 }] });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields['rows.0.tempC']).toBeTruthy();
    // Typed text goes through the same checks as a CSV cell, reported by row.
    const typed = await c.post(`/api/lots/${id}/assays`, { rows: [{ tempC: '45', timeH: 'two', residual: '0.5' }] });
    expect(typed.body.error.fields).toEqual({ 'row 1': 'time "two" is not a number' });
    expect((await upload(c, `/api/lots/${id}/assays`, 'bin.csv', Buffer.from([0xff, 0xfe, 0x00, 0x41]))).status).toBe(400);
  });

  it('refuses 100,001 rows with a clear error and accepts 100,000', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'CLP-2611-02');
    const rows = (n: number) => {
      const lines = ['temperature_c,time_h,residual_activity_fraction'];
      for (let i = 0; i < n; i++) {
        const tempC = i % 2 ? 45 : 50;
        const h = (i % 50) * 0.5;
        lines.push(`${tempC},${h},${Math.exp(-(tempC === 45 ? 0.02 : 0.05) * h).toFixed(5)}`);
      }
      return lines.join('\n');
    };
    const n0 = await pointCount();
    const tooMany = await upload(c, `/api/lots/${id}/assays`, 'huge.csv', rows(100_001), 'text/csv');
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error).toMatchObject({ code: 'too_many_rows' });
    expect(tooMany.body.error.message).toMatch(/100,001 data rows; the limit is 100,000/);
    expect(await pointCount()).toBe(n0);
    const ok = await upload(c, `/api/lots/${id}/assays`, 'large.csv', rows(100_000), 'text/csv');
    expect(ok.status).toBe(201);
    expect(ok.body.pointCount).toBe(100_000);
    expect(ok.body.points.length).toBe(2_000);
    expect(await pointCount()).toBe(n0 + 100_000);
  });

  it('refuses a CSV over 20 MB with 413', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'CLP-2611-02');
    const big = 'temperature_c,time_h,residual_activity\n' + '45,1,0.9\n'.repeat(Math.ceil((20 * 1024 * 1024) / 9));
    const r = await upload(c, `/api/lots/${id}/assays`, 'big.csv', big, 'text/csv');
    expect(r.status).toBe(413);
    expect(r.body.error.message).toMatch(/20 MB/);
  });

  it('stores formula-like notes as text and escapes them on CSV export', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'TAA-4522');
    const csv = [
      'temperature_c,time_h,residual_activity_fraction,note',
      "85,0,1,=cmd|' /C calc'!A0",
      '85,1,0.83,+SUM(A1:A2)',
      '89,0,1,-2+3',
      '89,1,0.6,@HYPERLINK("http://x.test")',
      '93,1,0.35,"plain, with comma"',
    ].join('\n');
    const r = await upload(c, `/api/lots/${id}/assays`, 'notes.csv', csv, 'text/csv');
    expect(r.status).toBe(201);
    expect(r.body.points.map((p: { note: string }) => p.note)).toEqual([
      "=cmd|' /C calc'!A0",
      '+SUM(A1:A2)',
      '-2+3',
      '@HYPERLINK("http://x.test")',
      'plain, with comma',
    ]);
    const res = await fetch(`${t.base}/api/lots/${id}/assays/${r.body.id}/csv`, { headers: { cookie: (await t.signIn('operator')).cookie! } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/text\/csv/);
    const lines = (await res.text()).trim().split('\r\n');
    expect(lines.slice(1)).toEqual([
      "85,0,1,'=cmd|' /C calc'!A0",
      "85,1,0.83,'+SUM(A1:A2)",
      "89,0,1,'-2+3",
      `89,1,0.6,"'@HYPERLINK(""http://x.test"")"`,
      '93,1,0.35,"plain, with comma"',
    ]);
    // A formula in a number column is not a number: refused with its line.
    const bad = await upload(c, `/api/lots/${id}/assays`, 'f.csv', 'temperature_c,time_h,residual_activity_fraction\n=1+84,1,0.5\n', 'text/csv');
    expect(bad.body.error.fields['line 2']).toMatch(/temperature "=1\+84" is not a number/);
  });

  it('serves the template CSV to every role, and it reads back as an assay', async () => {
    for (const role of ROLES) {
      const r = await (await t.signIn(role)).get('/api/lots/assay-template');
      expect(r.status, role).toBe(200);
      expect(r.headers.get('content-disposition')).toContain('assay-template.csv');
    }
    const c = await t.signIn('procurement');
    const template = (await c.get('/api/lots/assay-template')).body as string;
    const r = await upload(c, `/api/lots/${await lotId(c, 'TAA-4522')}/assays`, 'template.csv', template, 'text/csv');
    expect(r.status).toBe(201);
    expect(r.body.fit).not.toBeNull();
  });

  it('lets supervisors and operators read but not upload; other sites get 404', async () => {
    const id = await lotId(await t.signIn('operator'), 'TAA-4522');
    for (const role of ['supervisor', 'operator'] as Role[]) {
      expect((await upload(await t.signIn(role), `/api/lots/${id}/assays`, 'qc.csv', demoAssayCsv(points))).status).toBe(403);
    }
    expect((await upload(await t.signIn('engineer', 'other'), `/api/lots/${id}/assays`, 'qc.csv', demoAssayCsv(points))).status).toBe(404);
  });
});

describe('acceptance', () => {
  it('shows the failing lot a reject recommendation on its assay lower bound', async () => {
    const c = await t.signIn('procurement');
    const d = (await c.get(`/api/lots/${await lotId(c, 'TAA-4519')}`)).body;
    expect(d.evaluation.basis).toBe('assay');
    expect(d.evaluation.recommendation).toBe('reject');
    expect(d.evaluation.comparedH).toBe(d.assays[0].atSpec.lowerH);
    expect(d.evaluation.comparedH).toBeLessThan(d.enzyme.specMinHalfLifeH);
  });

  it('records accept with reason in the lot and the audit chain; a second decision is refused', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'TAA-4522');
    expect((await c.post(`/api/lots/${id}/decision`, { decision: 'accept', reason: '' })).status).toBe(400);
    expect((await c.post(`/api/lots/${id}/decision`, { decision: 'maybe', reason: 'Looks fine to me' })).status).toBe(400);
    const r = await c.post(`/api/lots/${id}/decision`, { decision: 'accept', reason: 'Assay lower bound above 3 h' });
    expect(r.status).toBe(200);
    expect(r.body.lot).toMatchObject({ status: 'accepted', decisionReason: 'Assay lower bound above 3 h' });
    expect(r.body.decidedBy).toBe('Rafael Lindqvist');
    const last = (await listAudit(t.db, 1)).at(-1)!;
    expect(last).toMatchObject({
      action: 'lot.accept',
      oldValue: { status: 'quarantined' },
      newValue: { status: 'accepted', reason: 'Assay lower bound above 3 h', basis: 'assay' },
    });
    expect((await verifyAudit(t.db, 1)).ok).toBe(true);
    const again = await c.post(`/api/lots/${id}/decision`, { decision: 'reject', reason: 'Changed my mind' });
    expect(again.status).toBe(409);
    expect((await c.get(`/api/lots/${id}`)).body.lot.status).toBe('accepted');
  });

  it('lets only procurement and admins decide; other sites get 404', async () => {
    const c = await t.signIn('procurement');
    const id = await lotId(c, 'TAA-4519');
    for (const role of ['engineer', 'supervisor', 'operator'] as Role[]) {
      expect((await (await t.signIn(role)).post(`/api/lots/${id}/decision`, { decision: 'accept', reason: 'Not my call anyway' })).status).toBe(403);
    }
    expect((await (await t.signIn('procurement', 'other')).post(`/api/lots/${id}/decision`, { decision: 'accept', reason: 'Other site' })).status).toBe(404);
    const r = await (await t.signIn('admin')).post(`/api/lots/${id}/decision`, { decision: 'reject', reason: 'Assay half-life below 3 h' });
    expect(r.body.lot.status).toBe('rejected');
  });
});
