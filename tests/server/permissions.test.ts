import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listApiRoutes, type ApiRoute } from '../../server/route-table';
import { canSee, NAV_ITEMS } from '../../src/components/shell/navigation';
import { can, CAPABILITIES, rolesWith } from '../../src/contracts/permissions';
import { ROLES } from '../../src/contracts/roles';
import { startTestApp, type TestApp } from './harness';

let t: TestApp;
let routes: ApiRoute[];
beforeAll(async () => {
  t = await startTestApp();
  routes = listApiRoutes(t.mounts);
});
afterAll(() => t.close());

const ROOT = path.join(__dirname, '../..');

// The API route each read hook in src/hooks asks for. A read hook missing here fails the first test below, so a
// new read cannot slip past the navigation check.
const READS: Record<string, string> = {
  useSite: 'GET /api/site',
  useUsers: 'GET /api/users',
  useInvites: 'GET /api/invites',
  useMailOutbox: 'GET /api/mail-outbox',
  useBilling: 'GET /api/billing',
  useInvoices: 'GET /api/billing/invoices',
  useAuditEvents: 'GET /api/audit-events',
  useVessels: 'GET /api/vessels',
  useEnzymes: 'GET /api/enzymes',
  useEnzyme: 'GET /api/enzymes/:id',
  useLots: 'GET /api/lots',
  useLot: 'GET /api/lots/:id',
  useRecipes: 'GET /api/recipes',
  useRecipe: 'GET /api/recipes/:id',
  usePlans: 'GET /api/plans',
  usePlan: 'GET /api/plans/:id',
  useChangeRequests: 'GET /api/change-requests',
  useChangeRequest: 'GET /api/change-requests/:id',
  useCalibration: 'GET /api/calibrations',
  useCalibrationSettings: 'GET /api/calibrations/settings',
  useBatches: 'GET /api/batches',
  useBatch: 'GET /api/batches/:id',
  useBatchSettings: 'GET /api/batches/settings',
  useImportProgress: 'GET /api/batches/:id/readings/import',
  useBatchLink: 'GET /api/control-link/batches/:id',
  useLinkStatus: 'GET /api/control-link/status',
  useVesselSources: 'GET /api/control-link/sources',
  // Open routes: the session, and the previews of an invite or reset link (pages outside the navigation).
  useSession: 'GET /api/session',
  useInvitePreview: 'POST /api/invites/preview',
  useResetPreview: 'POST /api/password-resets/preview',
};

/** Names of the hooks in src/hooks that read from the API when a screen renders (SWR), with their files. */
function readHooks(): Map<string, string> {
  const found = new Map<string, string>();
  const dir = path.join(ROOT, 'src/hooks');
  for (const file of fs.readdirSync(dir).filter((f) => f !== 'use-resource.ts')) {
    const text = fs.readFileSync(path.join(dir, file), 'utf8');
    for (const m of text.matchAll(/export (?:const|function) (use\w+)\b[^\n]*(?:\n(?!export)[^\n]*)*/g)) {
      if (/\buse(?:Resource|SWR)\b/.test(m[0])) found.set(m[1]!, file);
    }
  }
  return found;
}

function resolveImport(from: string, spec: string): string | null {
  const base = spec.startsWith('@/') ? path.join(ROOT, 'src', spec.slice(2)) : spec.startsWith('.') ? path.resolve(path.dirname(from), spec) : null;
  if (!base) return null;
  return ['.ts', '.tsx', '/index.ts', '/index.tsx'].map((ext) => base + ext).find((f) => fs.existsSync(f)) ?? null;
}

/** The read hooks a place's screens call: its route files in app/(app) and every client module they import. */
function readsOfPlace(name: string, hooks: Map<string, string>): string[] {
  const folder = path.join(ROOT, 'app/(app)', name);
  const start = fs.existsSync(folder)
    ? fs
        .readdirSync(folder, { recursive: true, encoding: 'utf8' })
        .filter((f) => f.endsWith('.tsx'))
        .map((f) => path.join(folder, f))
    : [`${folder}.tsx`];
  const seen = new Set<string>();
  const used = new Set<string>();
  const queue = [...start];
  while (queue.length) {
    const file = queue.pop()!;
    if (seen.has(file)) continue;
    seen.add(file);
    const text = fs.readFileSync(file, 'utf8');
    for (const m of text.matchAll(/^import (type )?\{([^}]*)\} from '([^']+)'/gm)) {
      if (m[1]) continue;
      const target = resolveImport(file, m[3]!);
      if (!target || !/src\/(components|hooks)\//.test(target)) continue;
      if (target.includes('/src/hooks/')) for (const n of m[2]!.split(',').map((s) => s.trim())) if (hooks.has(n)) used.add(n);
      queue.push(target);
    }
  }
  return [...used].sort();
}

describe('one permission table guards the API', () => {
  it('guards every route with a capability of the table (or marks it open), and its roles are that capability’s', () => {
    expect(routes.length).toBeGreaterThan(5);
    expect(routes.filter((r) => r.capability === null).map((r) => `${r.method} ${r.path}`)).toEqual([]);
    for (const r of routes.filter((r) => r.capability !== 'public')) {
      expect(CAPABILITIES, `${r.method} ${r.path}`).toContain(r.capability);
      expect(r.roles, `${r.method} ${r.path}`).toEqual(rolesWith(r.capability as (typeof CAPABILITIES)[number]));
    }
  });

  it('has no row that nothing reads: each capability guards a route or shows a place', () => {
    const used = new Set<string>([...routes.map((r) => r.capability ?? ''), ...NAV_ITEMS.map((i) => i.capability)]);
    expect(CAPABILITIES.filter((c) => !used.has(c))).toEqual([]);
  });

  it('answers can() from the table for every role and capability', () => {
    for (const c of CAPABILITIES) for (const role of ROLES) expect(can(role, c), `${role} ${c}`).toBe(rolesWith(c).includes(role));
    // Spot checks against the product brief: procurement decides lots, supervisors sign, operators log readings.
    expect(can('procurement', 'lots.decide')).toBe(true);
    expect(can('engineer', 'lots.decide')).toBe(false);
    expect(can('supervisor', 'change-requests.sign')).toBe(true);
    expect(can('engineer', 'change-requests.sign')).toBe(false);
    expect(can('operator', 'readings.log')).toBe(true);
    expect(can('admin', 'readings.log')).toBe(false);
  });
});

describe('the navigation never shows a place whose API the role cannot use', () => {
  const hooks = readHooks();

  it('knows the API route of every read hook', () => {
    expect([...hooks.keys()].filter((h) => !(h in READS)).sort()).toEqual([]);
    for (const [hook, route] of Object.entries(READS))
      expect(
        routes.map((r) => `${r.method} ${r.path}`),
        hook,
      ).toContain(route);
  });

  it.each(NAV_ITEMS.map((i) => i.name))('%s: every role that sees it may make every read its screens make', (name) => {
    const reads = readsOfPlace(name, hooks);
    expect(reads.length, `${name} reads nothing? the walk found no hooks`).toBeGreaterThan(0);
    const refused: string[] = [];
    for (const role of ROLES.filter((r) => canSee(r, name))) {
      for (const hook of reads) {
        const route = routes.find((r) => `${r.method} ${r.path}` === READS[hook])!;
        if (route.roles !== 'public' && !route.roles!.includes(role))
          refused.push(`${role} sees ${name}, whose ${hook} (${READS[hook]}) needs ${route.capability}`);
      }
    }
    expect(refused).toEqual([]);
  });
});
