// What the web bundle may carry, checked on the graph Metro bundles: everything reachable from the web entry
// (index.ts) and the routes (app/, which Expo Router loads whole). Type-only imports are left out here
// (tsPreCompilationDeps false), as the bundler drops them: the client takes the contracts' types, never zod.
// The built bundle itself is checked by tests/e2e/bundle-budget.test.ts (size, and no ZodError in it).
const base = require('./.dependency-cruiser.cjs');

module.exports = {
  forbidden: [
    {
      name: 'web-bundle-without-zod-or-drizzle',
      comment:
        'Nothing the browser loads reaches zod or drizzle-orm, even through another module: import contracts with `import type` and plain constants from src/contracts/rules.ts (DEVELOPERS.md).',
      severity: 'error',
      from: { path: ['^app/', '^index\\.ts$'] },
      to: { path: 'node_modules/(zod|drizzle-orm)/', reachable: true },
    },
  ],
  options: { ...base.options, tsPreCompilationDeps: false },
};
