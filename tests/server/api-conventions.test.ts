import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listApiRoutes } from '../../server/route-table';
import { ROLES, type Role } from '../../src/contracts/roles';
import { startTestApp, type TestApp } from './harness';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

// Fill path parameters with an id that exists, so a denial is about the role and not a missing record.
const concrete = (path: string) => path.replace(/:(\w+)/g, '1');

describe('every API route declares its roles', () => {
  it('has a guard on every route', () => {
    const routes = listApiRoutes(t.mounts);
    expect(routes.length).toBeGreaterThan(5);
    expect(routes.filter((r) => r.roles === null)).toEqual([]);
  });

  it('only signing in, asking who is signed in, taking up an invite or a reset link and the return from the payment page are open', () => {
    const open = listApiRoutes(t.mounts)
      .filter((r) => r.roles === 'public')
      .map((r) => `${r.method} ${r.path}`);
    expect(open.sort()).toEqual([
      'GET /api/billing/return',
      'GET /api/session',
      'POST /api/invites/accept',
      'POST /api/invites/preview',
      'POST /api/password-resets',
      'POST /api/password-resets/preview',
      'POST /api/session',
    ]);
  });

  it('refuses signed-out callers with 401 on every guarded route', async () => {
    const anon = t.client();
    for (const r of listApiRoutes(t.mounts).filter((r) => r.roles !== 'public')) {
      const res = await anon.req(r.method, concrete(r.path), r.method === 'GET' ? undefined : {});
      expect(res.status, `${r.method} ${r.path}`).toBe(401);
      expect(res.body.error.code).toBe('signed_out');
    }
  });

  it('refuses every role not in the list with 403, and lets listed roles through', async () => {
    const clients = Object.fromEntries(await Promise.all(ROLES.map(async (role) => [role, await t.signIn(role)]))) as Record<
      Role,
      Awaited<ReturnType<TestApp['signIn']>>
    >;
    for (const r of listApiRoutes(t.mounts).filter((r) => r.roles !== 'public' && r.path !== '/api/session')) {
      for (const role of ROLES) {
        const res = await clients[role].req(r.method, concrete(r.path), r.method === 'GET' ? undefined : {});
        const allowed = (r.roles as readonly Role[]).includes(role);
        if (allowed) expect([200, 201, 204, 400, 404, 409], `${role} ${r.method} ${r.path}`).toContain(res.status);
        else expect(res.status, `${role} ${r.method} ${r.path}`).toBe(403);
      }
    }
  });
});

describe('site isolation', () => {
  it('shows each site only its own records', async () => {
    const main = await t.signIn('engineer', 'main');
    const other = await t.signIn('engineer', 'other');
    const mainLots = (await main.get('/api/lots')).body.lots as { id: number }[];
    const otherLots = (await other.get('/api/lots')).body.lots as { id: number }[];
    expect(mainLots.length).toBeGreaterThan(0);
    expect(otherLots.length).toBe(mainLots.length);
    const mainIds = new Set(mainLots.map((l) => l.id));
    expect(otherLots.some((l) => mainIds.has(l.id))).toBe(false);
  });

  it('will not let an admin change a user of another site', async () => {
    const otherAdmin = await t.signIn('admin', 'other');
    const mainAdmin = await t.signIn('admin', 'main');
    const mainUsers = (await mainAdmin.get('/api/users')).body.users as { id: number; role: string }[];
    const target = mainUsers.find((u) => u.role === 'operator')!;
    const r = await otherAdmin.patch(`/api/users/${target.id}`, { role: 'engineer' });
    expect(r.status).toBe(404);
    const after = (await mainAdmin.get('/api/users')).body.users as { id: number; role: string }[];
    expect(after.find((u) => u.id === target.id)!.role).toBe('operator');
  });
});

describe('errors', () => {
  it('answers an unknown API path with a JSON 404', async () => {
    const r = await t.client().get('/api/no-such-thing');
    expect(r.status).toBe(404);
    expect(r.body.error.code).toBe('not_found');
  });

  it('answers malformed JSON with 400 and no stack trace', async () => {
    const r = await t.client().req('POST', '/api/session', '{"email": ', { 'content-type': 'application/json' });
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('invalid_json');
    expect(JSON.stringify(r.body)).not.toMatch(/at .*\.ts|node_modules|SyntaxError/);
  });

  it('refuses a body over the size limit with 413', async () => {
    const r = await t.client().post('/api/session', { email: 'a@b.test', password: 'x'.repeat(2_000_000) });
    expect(r.status).toBe(413);
  });

  it('refuses writes without the client header, and cross-site writes', async () => {
    const c = await t.signIn('admin');
    const noHeader = await fetch(`${t.base}/api/session`, {
      method: 'PATCH',
      headers: { cookie: c.cookie!, 'content-type': 'application/json' },
      body: '{"cautionsAcknowledged":true}',
    });
    expect(noHeader.status).toBe(403);
    const crossSite = await c.patch('/api/session', { cautionsAcknowledged: true }, { 'sec-fetch-site': 'cross-site' });
    expect(crossSite.status).toBe(403);
    expect((await c.get('/api/session')).body.user.cautionsAcknowledgedAt).toBeNull();
  });

  it('sends security headers', async () => {
    const r = await t.client().get('/api/session');
    expect(r.headers.get('content-security-policy')).toContain("default-src 'self'");
    expect(r.headers.get('x-content-type-options')).toBe('nosniff');
    expect(r.headers.get('x-powered-by')).toBeNull();
  });
});

describe('denials are audited', () => {
  it('records a wrong-role call and a signed-out call, with who, what and the status', async () => {
    const { listAudit } = await import('../../server/repositories/audit');
    // A caller's first refusal in a minute is an event of its own; the route matrix above refused many this minute.
    t.clock.advanceMinutes(1);
    const op = await t.signIn('operator');
    expect((await op.get('/api/users')).status).toBe(403);
    expect((await t.client().get('/api/lots')).status).toBe(401);
    // The audit row is written when the response finishes; give the event loop a turn.
    await new Promise((r) => setTimeout(r, 20));
    const mine = (await listAudit(t.db, 1)).filter((e) => e.action === 'access.denied' && e.entityId === 'GET /api/users');
    expect(mine.at(-1)).toMatchObject({ actor: 'operator@haldenbay.test', newValue: { status: 403, role: 'operator' } });
    const anon = (await listAudit(t.db, null)).filter((e) => e.action === 'access.denied' && e.entityId === 'GET /api/lots');
    expect(anon.at(-1)?.actor).toMatch(/^anonymous@/);
  });
});
