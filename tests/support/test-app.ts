import { mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Express } from 'express';
import { buildApp } from '../../api/src/app';
import { createContext } from '../../api/src/bootstrap';
import { loadConfig } from '../../api/src/config';
import type { AppContext } from '../../api/src/context';
import { stopQueue } from '../../api/src/services/job-queue';
import { createTestDatabase } from './database';

export interface TestApp {
  ctx: AppContext;
  app: Express;
  databaseUrl: string;
  close(): Promise<void>;
}

/** A real app on its own fresh database. `env` overrides configuration variables. */
export async function startTestApp(env: Record<string, string> = {}): Promise<TestApp> {
  const database = env.DATABASE_URL ? null : await createTestDatabase();
  const databaseUrl = env.DATABASE_URL ?? database!.url;
  const config = loadConfig({
    NODE_ENV: 'test',
    GRIDWRIGHT_DATA: mkdtempSync(path.join(os.tmpdir(), 'gw-data-')),
    JWT_SECRET: 'test-secret-not-for-production',
    WEBHOOK_ALLOW_LOOPBACK: 'true',
    LOG_LEVEL: process.env.LOG_LEVEL ?? 'silent',
    ...env,
    DATABASE_URL: databaseUrl,
  });
  const ctx = await createContext(config);
  const app = buildApp(ctx);
  return {
    ctx,
    app,
    databaseUrl,
    async close() {
      await stopQueue(ctx, { graceful: false });
      await ctx.mailer.close();
      await ctx.db.destroy();
      await database?.drop();
    },
  };
}
