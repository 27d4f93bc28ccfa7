import path from 'node:path';
import { cruise, type ICruiseOptions, type ICruiseResult } from 'dependency-cruiser';
import { describe, expect, it } from 'vitest';
import floorsConfig from '../../.dependency-cruiser.cjs';
import bundleConfig from '../../.dependency-cruiser-bundle.cjs';

// The project's own import rules, run over a fixture tree with one deliberately broken import per rule
// (tests/fixtures/import-rules/README.md): each rule must report exactly its broken import and nothing it allows.
const ROOT = path.resolve(__dirname, '../..');
const FIXTURE = path.join(ROOT, 'tests/fixtures/import-rules');
type Config = { forbidden: NonNullable<ICruiseOptions['ruleSet']>['forbidden']; options: ICruiseOptions };
const floors = floorsConfig as unknown as Config;
const bundle = bundleConfig as unknown as Config;

async function violations(config: Config, roots: string[]): Promise<string[]> {
  const { tsConfig: _paths, ...options } = config.options; // the fixture needs no path aliases
  const result = await cruise(roots, { ...options, baseDir: FIXTURE, validate: true, ruleSet: { forbidden: config.forbidden } });
  const output = result.output as ICruiseResult;
  return output.summary.violations.map((v) => `${v.rule.name}: ${v.from} -> ${v.cycle ? v.cycle.map((c) => c.name).join(' -> ') : v.to}`).sort();
}

describe('import rules (.dependency-cruiser.cjs)', () => {
  it('reports each broken floor in the fixture, and only those', async () => {
    expect(await violations(floors, ['app', 'src', 'server', 'db'])).toEqual([
      'batches-imports-model-planning-contracts-only: src/batches/status.ts -> src/api/rows.ts',
      'client-not-server-or-db: app/admin.ts -> db/client.ts',
      'contracts-import-zod-and-model-only: src/contracts/lots.ts -> src/api/rows.ts',
      'db-imports-nothing-above: db/reset.ts -> server/env.ts',
      'db-seed-uses-the-engine-not-the-server: db/seed.ts -> server/env.ts',
      'enum-modules-are-leaves: src/batches/enums.ts -> src/model/units.ts',
      'model-imports-only-itself: src/model/engine.ts -> src/contracts/units.ts',
      'no-circular: server/first.ts -> server/second.ts -> server/first.ts',
      'not-to-unresolvable: server/typo.js -> ./no-such-file',
      'planning-imports-model-and-contracts-only: src/planning/plan.ts -> src/api/rows.ts',
      'services-not-routes: server/services/lots.ts -> server/routes/services.ts',
    ]);
  });
});

describe('web bundle rule (.dependency-cruiser-bundle.cjs)', () => {
  it('reports a screen that reaches zod or drizzle-orm, directly or through another module, and not a type import', async () => {
    const found = await violations(bundle, ['app']);
    expect(found.map((v) => v.split(' -> ')[0])).toEqual([
      'web-bundle-without-zod-or-drizzle: app/history.ts',
      'web-bundle-without-zod-or-drizzle: app/planner.ts',
    ]);
    expect(found.join('\n')).toMatch(/history\.ts -> .*node_modules\/drizzle-orm\//);
    expect(found.join('\n')).toMatch(/planner\.ts -> .*node_modules\/zod\//);
  });
});
