// Starts one throwaway PostgreSQL cluster for the whole run and migrates a template database;
// each test file clones the template (tests/support/database.ts) so files never share state. Starts
// the local fake of the payment provider too; each test takes an account of its own on it.
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { createDataSource } from '../../api/src/db/data-source';
import { ensurePostgresInstalled, startCluster } from '../../scripts/lib/postgres.mjs';
import { startFakePaymentProvider } from '../../tools/fake-payments/src/server';

export interface TestPostgres {
  baseUrl: string;
  template: string;
  bin: string;
}

declare module 'vitest' {
  export interface ProvidedContext {
    pg: TestPostgres;
    payments: { url: string };
  }
}

export default async function setup(project: TestProject) {
  const bin = ensurePostgresInstalled((m) => process.stderr.write(`${m}\n`));
  const tmp = mkdtempSync(path.join(os.tmpdir(), 'gw-test-'));
  const template = 'gw_template';
  const cluster = await startCluster({ bin, dir: path.join(tmp, 'postgres'), database: template, ephemeral: true });
  const db = createDataSource(cluster.url);
  await db.initialize();
  await db.runMigrations({ transaction: 'each' });
  await db.destroy();
  project.provide('pg', { baseUrl: `postgres://postgres@127.0.0.1:${cluster.port}`, template, bin });
  const payments = await startFakePaymentProvider();
  project.provide('payments', { url: payments.url });
  return async () => {
    await payments.close();
    cluster.stop();
    rmSync(tmp, { recursive: true, force: true });
  };
}
