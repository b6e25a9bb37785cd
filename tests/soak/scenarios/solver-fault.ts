// A run whose solve overruns its time limit: it ends with a clear outcome or message, and the
// same worker process goes on to solve the next run.
import type pg from 'pg';
import { startApi, startWorker, submitRun, waitAllTerminal, type SoakTenant } from '../lib/harness';
import type { ResultRow } from '../lib/results';
import { busySiteSpec, smallSiteSpec } from '../lib/specs';

export async function solverFaultScenario(opts: { pool: pg.Pool; databaseUrl: string; tenant: SoakTenant }): Promise<ResultRow[]> {
  const api = await startApi(opts.databaseUrl);
  const worker = await startWorker(opts.databaseUrl, 1, 'fault-worker');
  try {
    const hard = { ...busySiteSpec('time-limit soak', 1), horizon: { start: '2027-09-06T00:00:00+02:00', stepMinutes: 5, steps: 288 } } as Record<string, any>;
    hard.supply = { availableKw: Array.from({ length: 288 }, (_v, t) => Math.max(0, Math.round(900 * Math.sin((Math.PI * (t - 72)) / 144)))) };
    hard.siteLoad = { kw: Array.from({ length: 288 }, (_v, t) => 120 + (t % 7) * 9), unservedPenaltyPerKwh: 3 };
    hard.grid = { importLimitKw: 400, exportLimitKw: 300, importPrice: Array.from({ length: 288 }, (_v, t) => Number((0.16 + 0.1 * Math.sin(t / 9)).toFixed(3))), exportPrice: 0.05 };
    hard.units = Array.from({ length: 20 }, (_v, i) => ({ id: `u-${i}`, kind: i % 2 ? 'generator' : 'flexible-load', ratingKw: 50 + 7 * i, minStableKw: 20 + i, ...(i % 2 ? { costPerKwh: 0.15 + 0.01 * i } : { valuePerKwh: 0.1 + 0.01 * i }), startupCost: 3 + i, minUpSteps: 6 + (i % 5), minDownSteps: 4 + (i % 3) }));
    const slow = await submitRun(api.base, opts.tenant.key, hard);
    if (slow.status !== 202) throw new Error(`POST /v1/runs answered ${slow.status}: ${JSON.stringify(slow.body).slice(0, 300)}`);
    const ended = (await waitAllTerminal(opts.pool, [slow.body.id], 5 * 60_000)).get(slow.body.id)!;
    const next = await submitRun(api.base, opts.tenant.key, smallSiteSpec('after the time limit'));
    const after = (await waitAllTerminal(opts.pool, [next.body.id], 120_000)).get(next.body.id)!;
    const { rows } = await opts.pool.query(`SELECT worker_id FROM runs WHERE id = $1`, [next.body.id]);
    const sameWorker = rows[0]?.worker_id === worker.workerId;
    return [
      { scenario: 'Solver time limit inside a run (1 s, 288 steps × 20 units)', measure: 'how the run ended', value: `${ended.status} / ${ended.outcome ?? '—'}${ended.error ? ` — ${ended.error.message}` : ''}`, pass: ended.status !== 'running' && (ended.outcome !== 'optimal' || ended.status === 'succeeded') },
      { scenario: 'Solver time limit inside a run (1 s, 288 steps × 20 units)', measure: 'next run on the same worker process', value: `${after.status}${sameWorker ? ' (same worker)' : ''}`, pass: after.status === 'succeeded' && sameWorker },
    ];
  } finally {
    await worker.child.kill();
    await api.child.kill();
  }
}
