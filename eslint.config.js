import { readdirSync } from 'node:fs';
import path from 'node:path';
import js from '@eslint/js';
import { createTypeScriptImportResolver } from 'eslint-import-resolver-typescript';
import importX from 'eslint-plugin-import-x';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';
import tseslint from 'typescript-eslint';

// The layer fences below work on resolved file paths, so an import is caught however it is spelt
// (`@/` alias, relative path, workspace package name). `tests/unit/lint-fences.test.ts` shows each one firing.
const root = import.meta.dirname;
const sourceFiles = ['api/src/**/*.{ts,mts,mjs}', 'shared/src/**/*.ts', 'console/src/**/*.{ts,tsx}'];
const features = readdirSync(path.join(root, 'console/src/features'), { withFileTypes: true })
  .filter((entry) => entry.isDirectory())
  .map((entry) => entry.name);

const layerZones = [
  ...features.map((feature) => ({
    target: `console/src/features/${feature}`,
    from: 'console/src/features',
    except: [`./${feature}`],
    message: 'Features never import each other; lift what both need to src/lib (queries) or src/components (UI).',
  })),
  {
    target: ['console/src/components', 'console/src/lib'],
    from: 'console/src/features',
    message: 'Shared components and lib code serve the features and import none of them.',
  },
  {
    target: 'api/src/engine',
    from: ['api/src/routes', 'api/src/services', 'api/src/db', 'api/src/runs', 'api/src/solver'],
    message: 'The engine is pure: it is handed what it needs and never reaches up into HTTP, use cases, the database or the solver process.',
  },
  {
    target: 'api/src/db',
    from: ['api/src/routes', 'api/src/services'],
    message: 'The database layer is below the use cases and the routes.',
  },
];
const dbFromAuthZone = {
  target: 'api/src/db',
  from: 'api/src/auth',
  message: 'The database layer is below authentication; keep role and scope types beside the data or in shared code.',
};

const ioModules = ['fs', 'worker_threads', 'os', 'child_process', 'cluster', 'net', 'tls', 'dgram', 'dns', 'http', 'https', 'http2', 'module', 'readline'];
const ioPackages = ['highs', 'express', 'typeorm', 'pg', 'pg-boss'];
const engineImportsNoIo = [
  'error',
  {
    patterns: [
      {
        group: [...ioModules.flatMap((m) => [m, `${m}/*`, `node:${m}`, `node:${m}/*`]), ...ioPackages.flatMap((p) => [p, `${p}/*`])],
        message: 'The engine does no I/O: files, threads, processes, network and the solver are handed to it.',
      },
    ],
  },
];

export default tseslint.config(
  { ignores: ['**/node_modules/**', '**/dist/**', '.data/**', 'test-artifacts/**', 'console/src/lib/api-types.ts'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-explicit-any': 'off',
    },
  },
  {
    files: ['console/src/**/*.{ts,tsx}'],
    languageOptions: { globals: { ...globals.browser } },
    plugins: { 'react-hooks': reactHooks },
    rules: { 'react-hooks/rules-of-hooks': 'error', 'react-hooks/exhaustive-deps': 'warn' },
  },
  {
    files: sourceFiles,
    plugins: { 'import-x': importX },
    settings: {
      // Without it the cycle check silently skips every TypeScript file it is led to.
      'import-x/extensions': ['.ts', '.tsx', '.mts', '.js', '.mjs'],
      'import-x/resolver-next': [
        createTypeScriptImportResolver({
          project: ['api/tsconfig.json', 'shared/tsconfig.json', 'console/tsconfig.json'].map((p) => path.join(root, p)),
          noWarnOnMultipleProjects: true,
        }),
      ],
    },
    rules: {
      // A fence only sees imports it can resolve, so an unresolvable one is an error rather than a gap in the fence.
      'import-x/no-unresolved': 'error',
      'import-x/no-cycle': ['error', { ignoreExternal: true }],
      'import-x/no-restricted-paths': ['error', { basePath: root, zones: [...layerZones, dbFromAuthZone] }],
    },
  },
  {
    files: ['api/src/engine/**/*.{ts,mts,mjs}'],
    rules: {
      'no-restricted-imports': engineImportsNoIo,
      // A computed module name would slip past the list above, and pure code has no use for loading modules late.
      'no-restricted-syntax': ['error', { selector: 'ImportExpression', message: 'The engine loads no modules at run time.' }],
    },
  },
);
