// Runs solved per minute per worker process on the small site spec, with one and with two workers.
import type pg from 'pg';
import { startApi, startWorker, submitRun, waitAllTerminal, type SoakTenant, type WorkerProcess } from '../lib/harness';
import type { ResultRow } from '../lib/results';

export async function throughputScenario(opts: { pool: pg.Pool; databaseUrl: string; tenant: SoakTenant; runsPerWorker: number; spec: (name: string) => unknown; specLabel: string }): Promise<ResultRow[]> {
  const rows: ResultRow[] = [];
  const api = await startApi(opts.databaseUrl);
  try {
    for (const workerCount of [1, 2]) {
      const workers: WorkerProcess[] = [];
      for (let i = 0; i < workerCount; i++) workers.push(await startWorker(opts.databaseUrl, 1, `throughput-${workerCount}-${i}`));
      const n = opts.runsPerWorker * workerCount;
      const ids: string[] = [];
      const started = Date.now();
      for (let i = 0; i < n; i++) {
        const res = await submitRun(api.base, opts.tenant.key, opts.spec(`throughput ${workerCount}w ${i}`));
        if (res.status !== 202) throw new Error(`POST /v1/runs answered ${res.status}: ${JSON.stringify(res.body).slice(0, 300)}`);
        ids.push(res.body.id);
      }
      const final = await waitAllTerminal(opts.pool, ids, 20 * 60_000);
      const minutes = (Date.now() - started) / 60_000;
      const ok = [...final.values()].filter((r) => r.status === 'succeeded').length;
      const perMinute = ok / minutes;
      const { rows: byWorker } = await opts.pool.query(`SELECT worker_id, count(*)::int AS n FROM runs WHERE id = ANY($1::uuid[]) GROUP BY 1 ORDER BY 1`, [ids]);
      rows.push({
        scenario: `Throughput, ${opts.specLabel}`,
        measure: `${workerCount} worker process${workerCount > 1 ? 'es' : ''} (concurrency 1), ${n} runs`,
        value: `${perMinute.toFixed(0)} runs/min in total, ${(perMinute / workerCount).toFixed(0)} per worker (split ${byWorker.map((r) => r.n).join(' / ')})`,
        pass: ok === n,
      });
      await Promise.all(workers.map((w) => w.child.kill()));
    }
    return rows;
  } finally {
    await api.child.kill();
  }
}
