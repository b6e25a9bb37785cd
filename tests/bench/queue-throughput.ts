// The bench's queue section: how fast one worker process drains small runs, against the bound the
// solver sets. On a throwaway PostgreSQL (fsync off), with a real worker process (`api/src/worker.ts`
// with its production settings) taking the runs from the queue; the runs are submitted through the
// service, in-process, so the API's own cost is not part of the figure.
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createContext } from '../../api/src/bootstrap';
import { loadConfig } from '../../api/src/config';
import type { AppContext } from '../../api/src/context';
import { submitRun } from '../../api/src/runs/submission';
import { stopQueue } from '../../api/src/services/job-queue';
import { ensurePostgresInstalled, startCluster } from '../../scripts/lib/postgres.mjs';
import { childEnv, createSoakTenant, migrate, newPool, startWorker, waitAllTerminal, type SoakTenant } from '../soak/lib/harness';
import { smallSiteSpec } from '../soak/lib/specs';

export interface QueueRow {
  variant: string;
  wallS: number;
  note: string;
}

interface Drain {
  runs: number;
  succeeded: number;
  /** From the first claim to the last ending. */
  seconds: number;
  meanSolveSeconds: number;
}

/** A small day-ahead site (24 hourly steps, 2 units, a battery); supply shifted per run so no two runs are the same model. */
function smallRun(i: number) {
  const spec = smallSiteSpec(`queue bench ${i}`) as { supply: { availableKw: number[] } };
  return { ...spec, supply: { availableKw: spec.supply.availableKw.map((kw) => kw + (i % 17)) } };
}

async function submitMany(ctx: AppContext, tenant: SoakTenant, from: number, count: number): Promise<string[]> {
  const ids: string[] = [];
  // Ten at a time: submitting stays well ahead of one worker, so the queue never runs dry.
  for (let i = from; i < from + count; i += 10) {
    const batch = Array.from({ length: Math.min(10, from + count - i) }, (_v, k) => submitRun(ctx, { tenantId: tenant.tenantId }, smallRun(i + k), null));
    ids.push(...(await Promise.all(batch)).map((r) => r.run.id));
  }
  return ids;
}

async function drain(ctx: AppContext, pool: ReturnType<typeof newPool>, tenant: SoakTenant, from: number, count: number): Promise<Drain> {
  const ids = await submitMany(ctx, tenant, from, count);
  await waitAllTerminal(pool, ids, 30 * 60_000);
  const { rows } = await pool.query(
    `SELECT count(*)::int AS runs, count(*) FILTER (WHERE status = 'succeeded')::int AS succeeded,
            extract(epoch FROM max(finished_at) - min(started_at))::float8 AS seconds, avg(solver_seconds)::float8 AS mean_solve
       FROM runs WHERE id = ANY($1::uuid[])`,
    [ids],
  );
  return { runs: rows[0].runs, succeeded: rows[0].succeeded, seconds: rows[0].seconds, meanSolveSeconds: rows[0].mean_solve };
}

/**
 * For each worker concurrency: a warm-up batch (not counted: the first solves of a process run
 * before V8 has optimised HiGHS), then `runs` small runs. Runs per minute are measured from the
 * first claim to the last ending; the solver-bound limit is 60 s ÷ the mean `solver_seconds` of
 * the same runs (the attempt's time from the claimed spec to the engine's answer), per slot.
 */
export async function queueThroughputSection(opts: { runs: number; warmUp: number }): Promise<{ rows: QueueRow[]; summary: string }> {
  const tmp = mkdtempSync(path.join(os.tmpdir(), 'gw-bench-queue-'));
  const cluster = await startCluster({ bin: ensurePostgresInstalled(() => {}), dir: path.join(tmp, 'postgres'), ephemeral: true });
  const rows: QueueRow[] = [];
  let summary = '';
  try {
    await migrate(cluster.url);
    const ctx = await createContext(loadConfig(childEnv(cluster.url, { LOG_LEVEL: 'silent' })));
    const pool = newPool(cluster.url);
    try {
      const tenant = await createSoakTenant(ctx, 'bench-queue');
      let next = 0;
      for (const concurrency of [1, 2]) {
        const worker = await startWorker(cluster.url, concurrency, `bench-queue-${concurrency}`);
        try {
          await drain(ctx, pool, tenant, next, opts.warmUp);
          next += opts.warmUp;
          const d = await drain(ctx, pool, tenant, next, opts.runs);
          next += opts.runs;
          const perMinute = (d.succeeded / d.seconds) * 60;
          const limit = (60 / d.meanSolveSeconds) * concurrency;
          const ratio = perMinute / limit;
          rows.push({
            variant: `${d.runs} small runs, one worker process, WORKER_CONCURRENCY=${concurrency}`,
            wallS: d.seconds,
            note: `${perMinute.toFixed(0)} runs/min (${d.succeeded} succeeded); mean solve ${(d.meanSolveSeconds * 1000).toFixed(0)} ms, so the solver-bound limit is ${limit.toFixed(0)} runs/min (${concurrency} slot${concurrency > 1 ? 's' : ''}); **${(ratio * 100).toFixed(0)} %** of it${concurrency === 1 ? ' (target ≥ 50 %)' : ''}`,
          });
          if (concurrency === 1) {
            summary = `Queue: one worker process drains ${perMinute.toFixed(0)} small runs per minute, ${(ratio * 100).toFixed(0)} % of the solver-bound ${limit.toFixed(0)} (60 s ÷ ${(d.meanSolveSeconds * 1000).toFixed(0)} ms mean solve; target ≥ 50 % — ${ratio >= 0.5 ? 'met' : '**not met**'}).`;
          }
        } finally {
          await worker.child.kill();
        }
      }
    } finally {
      await pool.end();
      await stopQueue(ctx);
      await ctx.mailer.close();
      await ctx.db.destroy();
    }
  } finally {
    cluster.stop();
    rmSync(tmp, { recursive: true, force: true });
  }
  return { rows, summary };
}
