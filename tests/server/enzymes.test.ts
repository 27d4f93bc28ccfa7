import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listAudit } from '../../server/repositories/audit';
import { ROLES } from '../../src/contracts/roles';
import { startTestApp, type TestApp } from './harness';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

const NEW = {
  name: 'Pectina PX-2',
  enzymeClass: 'Pectinase',
  ecNumber: '3.2.1.15',
  supplier: 'Brisa Enzymworks',
  activityUnit: 'PXU/g',
  unitDefinition: '1 PXU releases 1 µmol galacturonic acid per minute at pH 4.5 and 40 °C',
  tRefC: 50,
  eaKJPerMol: 45,
  specTempC: 50,
  specMinHalfLifeH: 12,
  specMinActivity: 900,
};

describe('enzyme table', () => {
  it('searches name, class, EC number and supplier, sorts and pages', async () => {
    const c = await t.signIn('operator');
    const all = await c.get('/api/enzymes');
    expect(all.status).toBe(200);
    expect(all.body.total).toBe(4);
    expect(all.body.enzymes.map((e: { name: string }) => e.name)).toEqual(['Amylo GA-17', 'Lacta LX-5', 'Lipo LP-3', 'Thermo AA-90']);
    const bySupplier = await c.get('/api/enzymes?q=corvane');
    expect(bySupplier.body.enzymes.map((e: { name: string }) => e.name).sort()).toEqual(['Amylo GA-17', 'Lipo LP-3']);
    expect((await c.get('/api/enzymes?q=3.2.1.23')).body.enzymes.map((e: { name: string }) => e.name)).toEqual(['Lacta LX-5']);
    // LIKE wildcards in the search are matched literally.
    expect((await c.get('/api/enzymes?q=%25')).body.total).toBe(0);
    const bySpec = await c.get('/api/enzymes?sort=specMinHalfLifeH&dir=desc');
    expect(bySpec.body.enzymes.map((e: { specMinHalfLifeH: number }) => e.specMinHalfLifeH)).toEqual([48, 30, 20, 3]);
    const page2 = await c.get('/api/enzymes?pageSize=3&page=2');
    expect(page2.body).toMatchObject({ total: 4, page: 2, pageSize: 3 });
    expect(page2.body.enzymes.map((e: { name: string }) => e.name)).toEqual(['Thermo AA-90']);
  });

  it('refuses a bad query with 400', async () => {
    const c = await t.signIn('engineer');
    for (const q of ['sort=password', 'page=0', 'pageSize=1000', 'dir=sideways']) {
      expect((await c.get(`/api/enzymes?${q}`)).status, q).toBe(400);
    }
  });
});

describe('creating and editing enzymes', () => {
  it('lets procurement, engineers and admins create; supervisors and operators only read', async () => {
    for (const role of ROLES) {
      const c = await t.signIn(role);
      const r = await c.post('/api/enzymes', { ...NEW, name: `${NEW.name} ${role}` });
      expect(r.status, role).toBe(['procurement', 'engineer', 'admin'].includes(role) ? 201 : 403);
    }
    const names = (await (await t.signIn('operator')).get('/api/enzymes?q=Pectina')).body.enzymes.map((e: { name: string }) => e.name).sort();
    expect(names).toEqual(['Pectina PX-2 admin', 'Pectina PX-2 engineer', 'Pectina PX-2 procurement']);
  });

  it('stores the new enzyme, audits it, and refuses a duplicate name with 409', async () => {
    const c = await t.signIn('procurement');
    const before = (await listAudit(t.db, 1)).length;
    const r = await c.post('/api/enzymes', NEW);
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject(NEW);
    const events = (await listAudit(t.db, 1)).slice(before);
    expect(events.map((e) => e.action)).toEqual(['enzyme.create']);
    const dup = await c.post('/api/enzymes', { ...NEW, name: 'pectina px-2' });
    expect(dup.status).toBe(409);
    expect(dup.body.error.fields.name).toBeTruthy();
    const same = (await c.get('/api/enzymes?q=pectina px-2')).body.enzymes.filter((e: { name: string }) => e.name.toLowerCase() === 'pectina px-2');
    expect(same).toHaveLength(1);
  });

  it('reports wrong types and missing fields by field, and stores nothing', async () => {
    const c = await t.signIn('engineer');
    const r = await c.post('/api/enzymes', { ...NEW, name: 'Bad one', tRefC: '60', ecNumber: '3.2.1', specMinHalfLifeH: -1, supplier: undefined });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['ecNumber', 'specMinHalfLifeH', 'supplier', 'tRefC']);
    expect((await c.get('/api/enzymes?q=Bad one')).body.total).toBe(0);
  });

  it('edits a field with an audit of old and new values; other sites get 404', async () => {
    const c = await t.signIn('engineer');
    const id = (await c.get('/api/enzymes?q=Lipo')).body.enzymes[0].id;
    const r = await c.patch(`/api/enzymes/${id}`, { specMinHalfLifeH: 32 });
    expect(r.status).toBe(200);
    expect(r.body.specMinHalfLifeH).toBe(32);
    const last = (await listAudit(t.db, 1)).at(-1)!;
    expect(last).toMatchObject({ action: 'enzyme.update', oldValue: { specMinHalfLifeH: 30 }, newValue: { specMinHalfLifeH: 32 } });
    const other = await t.signIn('engineer', 'other');
    expect((await other.patch(`/api/enzymes/${id}`, { specMinHalfLifeH: 1 })).status).toBe(404);
    expect((await other.get(`/api/enzymes/${id}`)).status).toBe(404);
    expect((await c.get(`/api/enzymes/${id}`)).body.enzyme.specMinHalfLifeH).toBe(32);
    expect((await c.patch(`/api/enzymes/${id}`, {})).status).toBe(400);
    expect((await (await t.signIn('supervisor')).patch(`/api/enzymes/${id}`, { specMinHalfLifeH: 1 })).status).toBe(403);
  });

  it('gives each lot history point its basis and interval, oldest first', async () => {
    const c = await t.signIn('supervisor');
    const id = (await c.get('/api/enzymes?q=Lacta')).body.enzymes[0].id;
    const r = await c.get(`/api/enzymes/${id}`);
    expect(r.status).toBe(200);
    const h = r.body.history as { lotCode: string; basis: string; halfLifeH: number; lowerH: number | null; upperH: number | null }[];
    expect(h.map((p) => p.lotCode)).toEqual(['OF-LX5-0926', 'OF-LX5-1107', 'OF-LX5-1128']);
    // OF-LX5-0926 is the calibration demo's certificate-only lot; OF-LX5-1107 has a QC assay.
    expect(h.map((p) => p.basis)).toEqual(['certificate', 'assay', 'certificate']);
    expect(h[1]!.lowerH! < h[1]!.halfLifeH && h[1]!.halfLifeH < h[1]!.upperH!).toBe(true);
    // The seed's certificates state 60 h (OF-LX5-0926) and 55 h (OF-LX5-1128) at the specification temperature (invented demo figures).
    expect(h[0]).toMatchObject({ halfLifeH: 60, lowerH: null, upperH: null });
    expect(h[2]).toMatchObject({ halfLifeH: 55, lowerH: null, upperH: null });
  });
});
