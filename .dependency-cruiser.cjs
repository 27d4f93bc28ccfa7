// The house's floors: what may import what (DEVELOPERS.md "Import rules"). `npm run lint` runs this file over
// app, src, server, db, tests and index.ts; tests/tooling/import-rules.test.ts shows each rule catching a broken import.
// Paths are relative to the repository root. Type-only imports count here (a type import still couples two floors);
// the web-bundle rule, which is about what runs in the browser, lives in .dependency-cruiser-bundle.cjs.

/** A leaf module of plain enums (`src/.../enums.ts`) that db/ and the API may both import; it imports nothing itself. */
const ENUM_LEAF = '^src/(enums|[a-z/-]*/enums)\\.ts$';

module.exports = {
  forbidden: [
    {
      name: 'model-imports-only-itself',
      comment: 'src/model is the pure engine: it imports nothing outside src/model (no npm package, no node module, no other folder).',
      severity: 'error',
      from: { path: '^src/model/' },
      to: { pathNot: '^src/model/' },
    },
    {
      name: 'client-not-server-or-db',
      comment: 'Client code (app/, src/, the web entry index.ts) never imports server/ or db/: it would pull node modules and drizzle into the web bundle.',
      severity: 'error',
      from: { path: ['^app/', '^src/', '^index\\.ts$'] },
      to: { path: ['^server/', '^db/'] },
    },
    {
      // The schema's JSON columns are typed with the contracts' shapes (`import type`, gone at build time): allowed,
      // because they run nothing; a value import from src/ (other than an enum leaf) still fails.
      name: 'db-imports-nothing-above',
      comment: `db/ is the floor: it imports no server/, app/, src/ or tests/ module, except leaf enum modules (${ENUM_LEAF}) and types.`,
      severity: 'error',
      from: { path: '^db/', pathNot: '^db/seed\\.ts$' },
      to: { path: ['^server/', '^app/', '^src/', '^tests/', '^index\\.ts$'], pathNot: ENUM_LEAF, dependencyTypesNot: ['type-only'] },
    },
    {
      name: 'db-seed-uses-the-engine-not-the-server',
      comment:
        'The one named exception to the db floor: db/seed.ts computes the demo figures with src/ (model, stability, contracts) as the server does, but imports no server/, app/ or tests/ module.',
      severity: 'error',
      from: { path: '^db/seed\\.ts$' },
      to: { path: ['^server/', '^app/', '^tests/', '^index\\.ts$'] },
    },
    {
      name: 'enum-modules-are-leaves',
      comment: 'An enums.ts module is shared by db/ and the API only because it imports nothing (no zod, no other module).',
      severity: 'error',
      from: { path: ENUM_LEAF },
      to: {},
    },
    {
      name: 'services-not-routes',
      comment: 'Services are use cases under the routes: a service never imports from server/routes/.',
      severity: 'error',
      from: { path: '^server/services/' },
      to: { path: '^server/routes/' },
    },
    {
      name: 'contracts-import-zod-and-model-only',
      comment: 'src/contracts is the one definition of the API: zod, src/model and other contracts only.',
      severity: 'error',
      from: { path: '^src/contracts/' },
      to: { pathNot: ['^src/contracts/', '^src/model/', 'node_modules/zod/', ENUM_LEAF] },
    },
    {
      name: 'planning-imports-model-and-contracts-only',
      comment: 'src/planning runs in the planner screen and in the server alike: src/model and src/contracts only.',
      severity: 'error',
      from: { path: '^src/planning/' },
      to: { pathNot: ['^src/planning/', '^src/model/', '^src/contracts/', ENUM_LEAF] },
    },
    {
      name: 'batches-imports-model-planning-contracts-only',
      comment: 'src/batches runs in the batch screen and in the server alike: src/model, src/planning and src/contracts only.',
      severity: 'error',
      from: { path: '^src/batches/' },
      to: { pathNot: ['^src/batches/', '^src/model/', '^src/planning/', '^src/contracts/', ENUM_LEAF] },
    },
    {
      name: 'no-circular',
      comment: 'No import cycle that runs (a cycle closed only by a type import is harmless): a cycle makes initialisation order matter.',
      severity: 'error',
      from: {},
      to: { circular: true, viaOnly: { dependencyTypesNot: ['type-only'] } },
    },
    {
      name: 'not-to-unresolvable',
      comment: 'An import that resolves to no file (a typo, or a package missing from package.json).',
      severity: 'error',
      from: {},
      to: { couldNotResolve: true },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    exclude: { path: ['^tests/fixtures/import-rules/', '^dist/', '^\\.expo/', '^data/', '^migrations/'] },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    moduleSystems: ['es6', 'cjs'],
    enhancedResolveOptions: {
      exportsFields: ['exports'],
      conditionNames: ['import', 'require', 'node', 'default', 'types'],
      mainFields: ['module', 'main', 'types', 'typings'],
      extensions: ['.ts', '.tsx', '.d.ts', '.js', '.mjs', '.cjs', '.json'],
    },
    reporterOptions: { text: { highlightFocused: true } },
  },
};
