// The realistic study: a 15-minute year of the bench's grid-tied site × 8 variants (four battery sizes ×
// two export tariffs), through the study service and real worker processes on a throwaway PostgreSQL,
// as `POST /v1/studies` would queue it. Prints the study's progress as the API reports it, and the wall
// time from creation to the last run's end. Keeps both cores busy for minutes, so run it on an
// otherwise idle machine: `npx tsx tests/bench/study-year.ts [--days N] [--workers N]`.
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { createContext } from '../../api/src/bootstrap';
import { loadConfig } from '../../api/src/config';
import { stopQueue } from '../../api/src/services/job-queue';
import { getStudy } from '../../api/src/studies/reading';
import { createStudy } from '../../api/src/studies/submission';
import { ensurePostgresInstalled, startCluster } from '../../scripts/lib/postgres.mjs';
import { childEnv, createSoakTenant, migrate, newPool, startWorker, type WorkerProcess } from '../soak/lib/harness';
import { gridTiedSiteSpec } from './sites';

const { values: args } = parseArgs({ options: { days: { type: 'string', default: '365' }, workers: { type: 'string', default: '1' } } });
const days = Number(args.days);
const workerCount = Number(args.workers);

const base = gridTiedSiteSpec(days, 15);
const request = {
  name: `Bench study: ${days} days × 15 min, 8 variants`,
  baseSpec: { ...base, solver: { ...base.solver, mode: 'rolling' as const, timeLimitSeconds: 900 } },
  changes: [
    { pointer: '/storage/0/capacityKwh', label: 'battery kWh', values: [400, 800, 1200, 1600] },
    { pointer: '/grid/exportPrice', label: 'export tariff', values: [base.grid!.exportPrice, 0.06] },
  ],
};

const tmp = mkdtempSync(path.join(os.tmpdir(), 'gw-bench-study-'));
const cluster = await startCluster({ bin: ensurePostgresInstalled(() => {}), dir: path.join(tmp, 'postgres'), ephemeral: true });
const workers: WorkerProcess[] = [];
try {
  await migrate(cluster.url);
  const ctx = await createContext(loadConfig(childEnv(cluster.url, { LOG_LEVEL: 'silent' })));
  const pool = newPool(cluster.url);
  try {
    const tenant = await createSoakTenant(ctx, 'bench-study');
    for (let i = 0; i < workerCount; i++) workers.push(await startWorker(cluster.url, 1, `bench-study-${i}`));
    const started = Date.now();
    const study = await createStudy(ctx, { tenantId: tenant.tenantId }, request);
    const created = (Date.now() - started) / 1000;
    console.log(`${request.name}: ${study.progress.runsTotal} runs of ${base.horizon.steps} steps created in ${created.toFixed(1)} s, ${workerCount} worker process(es), WORKER_CONCURRENCY=1`);
    let lastLine = '';
    for (;;) {
      const view = await getStudy(ctx, tenant.tenantId, study.id);
      const p = view.progress;
      const line = `${p.runsDone}/${p.runsTotal} runs done, ${p.percent} %, ${p.running} running`;
      if (line !== lastLine) console.log(`  ${((Date.now() - started) / 1000).toFixed(0).padStart(5)} s  ${line}`);
      lastLine = line;
      if (view.status !== 'running') break;
      await new Promise((r) => setTimeout(r, 5000));
    }
    const { rows } = await pool.query(
      `SELECT count(*) FILTER (WHERE status = 'succeeded')::int AS succeeded, avg(solver_seconds)::float8 AS mean_solve,
              extract(epoch FROM max(finished_at) - min(created_at))::float8 AS wall
         FROM runs WHERE study_id = $1`,
      [study.id],
    );
    const r = rows[0];
    console.log(`done: ${r.succeeded} of 8 succeeded; ${r.wall.toFixed(0)} s from creation to the last run's end; mean run ${r.mean_solve.toFixed(1)} s`);
  } finally {
    await pool.end();
    await stopQueue(ctx);
    await ctx.mailer.close();
    await ctx.db.destroy();
  }
} finally {
  for (const w of workers) await w.child.kill();
  cluster.stop();
  rmSync(tmp, { recursive: true, force: true });
}
