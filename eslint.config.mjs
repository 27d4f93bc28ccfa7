// One lint configuration for the whole repository (app, src, server, db, tests, scripts).
// Formatting is Prettier's job (.prettierrc.json); this file holds only rules about meaning.
// Import floors (what may import what) are dependency-cruiser's job (.dependency-cruiser.cjs).
import js from '@eslint/js';
import { defineConfig, globalIgnores } from 'eslint/config';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';
import tseslint from 'typescript-eslint';

export default defineConfig([
  globalIgnores(['node_modules/', 'dist/', '.expo/', 'data/', 'test-results/', 'backups/', 'migrations/', 'tests/.tmp-*']),
  js.configs.recommended,
  tseslint.configs.recommended,
  reactHooks.configs.flat.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    linterOptions: { reportUnusedDisableDirectives: 'error' },
    rules: {
      // The exhaustive-deps advice is a real bug more often than not here: an error, not a warning nobody reads.
      'react-hooks/exhaustive-deps': 'error',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none', ignoreRestSiblings: true }],
      // The house writes `cond && f()` and `odd ? a++ : b++` as statements; a bare comparison is still caught.
      '@typescript-eslint/no-unused-expressions': ['error', { allowShortCircuit: true, allowTernary: true }],
      // Metro resolves assets (fonts) by require, and index.ts requires the router only after its warm-up.
      '@typescript-eslint/no-require-imports': ['error', { allow: ['\\.woff2$', '^expo-router/entry$'] }],
    },
  },
  {
    // The server's database calls are asynchronous: a promise left unawaited is a write that may not have happened
    // (or a failure nobody sees), and a promise used as a condition is always true. Type-aware, so server-side only.
    files: ['server/**/*.ts', 'db/**/*.ts', 'tests/**/*.ts'],
    ignores: ['tests/fixtures/**', 'tests/e2e/**'],
    languageOptions: { parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname } },
    rules: {
      '@typescript-eslint/no-floating-promises': 'error',
      '@typescript-eslint/no-misused-promises': ['error', { checksVoidReturn: false }],
      '@typescript-eslint/await-thenable': 'error',
    },
  },
  {
    // Tests and the local payment fake read untyped JSON bodies: `any` there is the honest type.
    files: ['tests/**', 'server/fakes/**'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
  {
    // Plain CommonJS config files (Metro reads metro.config.js with require).
    files: ['**/*.js', '**/*.cjs'],
    ignores: ['tests/e2e/layout-probe.js'],
    languageOptions: { sourceType: 'commonjs' },
    rules: { '@typescript-eslint/no-require-imports': 'off' },
  },
  {
    // One function expression handed to page.evaluate as text (see its header): the file is an expression on purpose.
    files: ['tests/e2e/layout-probe.js'],
    languageOptions: { sourceType: 'script' },
    rules: { '@typescript-eslint/no-unused-expressions': 'off' },
  },
]);
