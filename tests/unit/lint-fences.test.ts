// The layer fences of eslint.config.js, each shown firing on an import that crosses it. The probe files are
// linted as text under a path inside the fenced folder, so nothing is written to the tree; the modules they
// import are real, because the fences work on resolved paths.
import path from 'node:path';
import { ESLint } from 'eslint';
import { beforeAll, describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '../..');
let eslint: ESLint;

/** The rules that fire on each import line of `imports`, linted as the file at `filePath`. */
async function firedRules(filePath: string, imports: string[]): Promise<string[][]> {
  const names = imports.map((_, i) => `m${i}`);
  const code = [...imports.map((line, i) => line.replace('{{name}}', names[i])), `export const used = [${names.join(', ')}];`, ''].join('\n');
  const [result] = await eslint.lintText(code, { filePath: path.join(root, filePath) });
  return imports.map((_, i) => result.messages.filter((m) => m.line === i + 1).map((m) => m.ruleId ?? m.message));
}

beforeAll(() => {
  eslint = new ESLint({ cwd: root });
});

describe('console features import no other feature', () => {
  it('catches an import of another feature however it is spelt', async () => {
    const fired = await firedRules('console/src/features/runs/components/probe.tsx', [
      "import { useEndpoints as {{name}} } from '@/features/webhooks/api';",
      "import { DeliveryLog as {{name}} } from '../../webhooks/components/delivery-log';",
      "import { useApiKeys as {{name}} } from '../../../features/keys/api';",
      "import type { SpecCheck as {{name}} } from '@/features/workbench/api';",
      "import { AuditLog as {{name}} } from '@/features/audit/components/audit-log.tsx';",
    ]);
    expect(fired).toEqual(Array(5).fill(['import-x/no-restricted-paths']));
  });

  it('lets a feature import its own modules, shared components and lib', async () => {
    const fired = await firedRules('console/src/features/runs/components/probe.tsx', [
      "import { useRuns as {{name}} } from '../api';",
      "import { useRunSpec as {{name}} } from '@/features/runs/api';",
      "import { Table as {{name}} } from '@/components/data-table';",
      "import { useRun as {{name}} } from '@/lib/queries/runs';",
    ]);
    expect(fired).toEqual(Array(4).fill([]));
  });

  it('keeps src/components and src/lib free of features', async () => {
    expect(await firedRules('console/src/components/probe.tsx', ["import { useRuns as {{name}} } from '@/features/runs/api';"])).toEqual([['import-x/no-restricted-paths']]);
    expect(await firedRules('console/src/lib/queries/probe.ts', ["import { useUsage as {{name}} } from '../../features/usage/api';"])).toEqual([['import-x/no-restricted-paths']]);
  });
});

describe('the engine imports no I/O', () => {
  const probe = 'api/src/engine/probe.ts';

  it('refuses Node I/O modules and the I/O packages in every spelling', async () => {
    const modules = ['node:fs', 'fs/promises', 'node:worker_threads', 'os', 'node:child_process', 'node:net', 'node:http', 'https', 'node:module', 'highs', 'express', 'typeorm', 'pg', 'pg-boss'];
    const fired = await firedRules(probe, modules.map((m) => `import * as {{name}} from '${m}';`));
    expect(fired).toEqual(Array(modules.length).fill(['no-restricted-imports']));
  });

  it('refuses routes, services and the database', async () => {
    const fired = await firedRules(probe, [
      "import * as {{name}} from '../services/mail';",
      "import * as {{name}} from '../routes/auth';",
      "import * as {{name}} from '../db/entities/tenant';",
      "import * as {{name}} from '../../src/db/data-source';",
    ]);
    expect(fired).toEqual(Array(4).fill(['import-x/no-restricted-paths']));
  });

  it('refuses loading a module at run time', async () => {
    const [result] = await eslint.lintText("export const load = (name: string) => import(name);\n", { filePath: path.join(root, probe) });
    expect(result.messages.map((m) => m.ruleId)).toEqual(['no-restricted-syntax']);
  });

  it('lets the engine import its own modules and the shared contract', async () => {
    const fired = await firedRules(probe, [
      "import { planWindow as {{name}} } from './plan-window';",
      "import type { ResolvedSiteSpec as {{name}} } from '@gridwright/shared/site-spec';",
    ]);
    expect(fired).toEqual([[], []]);
  });
});

describe('the database layer imports no routes, services or auth', () => {
  it('refuses each of them', async () => {
    const fired = await firedRules('api/src/db/entities/probe.ts', [
      "import * as {{name}} from '../../routes/auth';",
      "import * as {{name}} from '../../services/mail';",
      "import type * as {{name}} from '../../auth/principal';",
    ]);
    expect(fired).toEqual(Array(3).fill(['import-x/no-restricted-paths']));
  });

  it('keeps the routes and services fence on the entities that still read auth types', async () => {
    // The probe stands for a real entity that services import, so the cycle rule fires as well.
    const [fired] = await firedRules('api/src/db/entities/user.ts', ["import * as {{name}} from '../../services/mail';"]);
    expect(fired).toContain('import-x/no-restricted-paths');
  });
});

describe('no import cycles', () => {
  // Each probe stands in for a real module that a real module imports, so the probe's one import closes a
  // cycle. (The rule reports a file's first cycle only, hence one import per probe.)
  it.each([
    ['through the console alias', 'console/src/lib/api-problem.ts', "import { api as {{name}} } from '@/lib/api-client';"], // api-client.ts imports api-problem.ts
    ['through a relative path', 'console/src/lib/api-problem.ts', "import { unwrap as {{name}} } from './api-client';"],
    ['of two api modules', 'api/src/app.ts', "import { startServer as {{name}} } from './server';"], // server.ts imports app.ts
    ['over several api modules', 'api/src/app.ts', "import * as {{name}} from './main';"], // main.ts imports server.ts
  ])('finds a cycle %s', async (_, filePath, line) => {
    expect(await firedRules(filePath, [line])).toEqual([['import-x/no-cycle']]);
  });

  it('checks shared/ too', async () => {
    const config = await eslint.calculateConfigForFile(path.join(root, 'shared/src/site-spec.ts'));
    expect(config.rules['import-x/no-cycle']?.[0]).toBe(2);
  });
});

describe('every import resolves', () => {
  it('reports an import the fences cannot resolve, instead of letting it through', async () => {
    const fired = await firedRules('console/src/features/runs/components/probe.tsx', ["import { useX as {{name}} } from '@/features/no-such-feature/api';"]);
    expect(fired).toEqual([['import-x/no-unresolved']]);
  });
});
