import { mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { createContext } from '../../../api/src/bootstrap';
import { loadConfig } from '../../../api/src/config';
import type { AppContext } from '../../../api/src/context';
import { createDataSource } from '../../../api/src/db/data-source';
import { createApiKey } from '../../../api/src/services/api-keys';
import { createTenant } from '../../../api/src/services/tenants';
import { spawnTs, waitFor, type Child } from './child-process';

/** What every soak child process gets: production settings (the queue's defaults too) and loopback webhooks. */
export function childEnv(databaseUrl: string, extra: Record<string, string> = {}): Record<string, string> {
  return {
    NODE_ENV: 'production',
    DATABASE_URL: databaseUrl,
    JWT_SECRET: 'soak-secret-not-for-production',
    GRIDWRIGHT_DATA: mkdtempSync(path.join(os.tmpdir(), 'gw-soak-data-')),
    LOG_LEVEL: 'warn',
    SEED_DEMO: 'false',
    WEBHOOK_ALLOW_LOOPBACK: 'true',
    ...extra,
  };
}

export async function migrate(databaseUrl: string): Promise<void> {
  const db = createDataSource(databaseUrl);
  await db.initialize();
  await db.runMigrations({ transaction: 'each' });
  await db.destroy();
}

export interface SoakTenant {
  tenantId: string;
  key: string;
}

/** A tenant with an all-scopes key and limits raised so only the system, not the plan, is measured. */
export async function createSoakTenant(ctx: AppContext, slug: string): Promise<SoakTenant> {
  const tenant = await createTenant(ctx, { slug, planId: 'fleet' });
  await ctx.db.query(`UPDATE tenants SET limit_overrides = $2::jsonb WHERE id = $1`, [
    tenant.id,
    JSON.stringify({ requestsPerSecond: 1_000_000, monthlyRuns: 10_000_000, monthlySolverSeconds: 100_000_000, concurrentRuns: 100_000 }),
  ]);
  const { key } = await createApiKey(ctx, { tenantId: tenant.id, name: 'soak', scopes: ['runs:read', 'runs:write', 'series:write', 'webhooks:manage'] }, {});
  return { tenantId: tenant.id, key };
}

export async function soakContext(databaseUrl: string): Promise<AppContext> {
  return createContext(loadConfig(childEnv(databaseUrl, { LOG_LEVEL: 'silent' })));
}

export interface ApiProcess {
  child: Child;
  base: string;
}

export async function startApi(databaseUrl: string, extra: Record<string, string> = {}): Promise<ApiProcess> {
  const child = spawnTs('tests/soak/lib/serve-api.ts', childEnv(databaseUrl, extra), 'api');
  const [, port] = await child.waitForLine(/listening (\d+)/, 60_000);
  return { child, base: `http://127.0.0.1:${port}` };
}

export interface WorkerProcess {
  child: Child;
  workerId: string;
  pid: number;
}

export async function startWorker(databaseUrl: string, concurrency = 1, label = 'worker'): Promise<WorkerProcess> {
  const child = spawnTs('api/src/worker.ts', childEnv(databaseUrl, { WORKER_CONCURRENCY: String(concurrency) }), label);
  const [, workerId] = await child.waitForLine(/worker ready (\S+)/, 60_000);
  return { child, workerId, pid: child.proc.pid! };
}

export async function submitRun(base: string, key: string, spec: unknown, headers: Record<string, string> = {}): Promise<{ status: number; body: any; contentType: string }> {
  const res = await fetch(`${base}/v1/runs`, {
    method: 'POST',
    headers: { authorization: `Bearer ${key}`, 'content-type': 'application/json', ...headers },
    body: JSON.stringify(spec),
  });
  const text = await res.text();
  let body: any;
  try {
    body = JSON.parse(text);
  } catch {
    body = text;
  }
  return { status: res.status, body, contentType: res.headers.get('content-type') ?? '' };
}

export async function runStatuses(pool: pg.Pool, ids: string[]): Promise<Map<string, { status: string; outcome: string | null; attempts: number; error: any }>> {
  const { rows } = await pool.query(`SELECT id, status, outcome, attempts, error FROM runs WHERE id = ANY($1::uuid[])`, [ids]);
  return new Map(rows.map((r) => [r.id, { status: r.status, outcome: r.outcome, attempts: r.attempts, error: r.error }]));
}

const TERMINAL = new Set(['succeeded', 'failed', 'cancelled']);

export async function waitAllTerminal(pool: pg.Pool, ids: string[], timeoutMs: number) {
  return waitFor(
    `${ids.length} runs to end`,
    async () => {
      const s = await runStatuses(pool, ids);
      return [...s.values()].every((r) => TERMINAL.has(r.status)) && s.size === ids.length ? s : undefined;
    },
    timeoutMs,
    500,
  );
}

export function newPool(databaseUrl: string): pg.Pool {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 4 });
  // During the outage scenario idle clients see the server go away; that is expected, not fatal.
  pool.on('error', () => {});
  return pool;
}
