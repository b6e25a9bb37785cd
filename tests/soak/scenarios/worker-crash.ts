// 100 runs, two worker processes, three SIGKILLs of a worker while it holds a running run:
// every run must end succeeded, and the integrator must hear of each success exactly once. Also
// measured: how long an orphaned run waits before it is back in the queue, and before another
// worker solves it again (target: back in the queue within 15 s).
import type pg from 'pg';
import { createEndpoint } from '../../../api/src/services/webhooks';
import type { AppContext } from '../../../api/src/context';
import { sleep, waitFor } from '../lib/child-process';
import { startApi, startWorker, submitRun, waitAllTerminal, type SoakTenant, type WorkerProcess } from '../lib/harness';
import type { ResultRow } from '../lib/results';
import { busySiteSpec } from '../lib/specs';
import { messagesPerRun, startReceiver } from '../lib/webhook-receiver';

export async function workerCrashScenario(opts: { ctx: AppContext; pool: pg.Pool; databaseUrl: string; tenant: SoakTenant; runs: number; kills: number }): Promise<ResultRow[]> {
  const { ctx, pool, databaseUrl, tenant } = opts;
  const receiver = await startReceiver();
  await createEndpoint(ctx, tenant.tenantId, { url: receiver.url, events: ['run.succeeded', 'run.failed'] });
  const api = await startApi(databaseUrl);
  const workers: WorkerProcess[] = [await startWorker(databaseUrl, 1, 'worker-a'), await startWorker(databaseUrl, 1, 'worker-b')];
  const started = Date.now();
  try {
    const ids: string[] = [];
    for (let i = 0; i < opts.runs; i++) {
      const res = await submitRun(api.base, tenant.key, busySiteSpec(`crash soak ${i}`, 5));
      if (res.status !== 202) throw new Error(`submission ${i} answered ${res.status}: ${JSON.stringify(res.body).slice(0, 300)}`);
      ids.push(res.body.id);
    }
    const killed: string[] = [];
    const requeuedAfter: number[] = [];
    const resumedAfter: number[] = [];
    for (let k = 0; k < opts.kills; k++) {
      // Wait until some live worker holds a running run, then kill exactly that process.
      const victim = await waitFor(
        'a worker mid-solve',
        async () => {
          const { rows } = await pool.query(`SELECT id, worker_id FROM runs WHERE id = ANY($1::uuid[]) AND status = 'running'`, [ids]);
          for (const r of rows) {
            const w = workers.find((x) => x.workerId === r.worker_id && x.child.proc.exitCode === null && x.child.proc.signalCode === null);
            if (w) return { worker: w, runId: r.id as string };
          }
          return undefined;
        },
        120_000,
        50,
      );
      await sleep(150);
      victim.worker.child.proc.kill('SIGKILL');
      const killedAt = performance.now();
      const holder = async () => (await pool.query(`SELECT status, worker_id FROM runs WHERE id = $1`, [victim.runId])).rows[0] as { status: string; worker_id: string | null };
      const elapsed = () => (performance.now() - killedAt) / 1000;
      // Back in the queue: no longer running under the dead worker (queued, or already taken again).
      const released = await waitFor(
        'the orphaned run back in the queue',
        async () => {
          const h = await holder();
          return h.worker_id !== victim.worker.workerId || h.status !== 'running' ? { seconds: elapsed(), ...h } : undefined;
        },
        120_000,
        20,
      );
      // A run that ended under the dead worker had finished just before the kill: nothing to recover.
      if (released.worker_id !== victim.worker.workerId) {
        requeuedAfter.push(released.seconds);
        resumedAfter.push(await waitFor('the orphaned run taken by another worker', async () => ((await holder()).status !== 'queued' ? elapsed() : undefined), 120_000, 20));
      }
      await victim.worker.child.exited;
      killed.push(victim.runId);
      workers.splice(workers.indexOf(victim.worker), 1);
      workers.push(await startWorker(databaseUrl, 1, `worker-replacement-${k + 1}`));
    }
    const final = await waitAllTerminal(pool, ids, 15 * 60_000);
    const seconds = (Date.now() - started) / 1000;
    await waitFor('the success webhooks', async () => (messagesPerRun(receiver.events, 'run.succeeded').size >= ids.length ? true : undefined), 120_000).catch(() => false);
    const succeeded = [...final.values()].filter((r) => r.status === 'succeeded').length;
    const retried = [...final.values()].filter((r) => r.attempts > 1).length;
    const perRun = messagesPerRun(receiver.events, 'run.succeeded');
    const twice = [...perRun.values()].filter((m) => m.size > 1).length;
    // Usage is written just after each run's ending.
    const countUsage = async () => (await pool.query(`SELECT count(*)::int AS n FROM run_usage WHERE run_id = ANY($1::uuid[])`, [ids])).rows[0].n as number;
    await waitFor('a usage row per run', async () => ((await countUsage()) >= ids.length ? true : undefined), 60_000).catch(() => false);
    const usage = { rows: [{ n: await countUsage() }] };
    const failures = [...final.entries()].filter(([, r]) => r.status !== 'succeeded').slice(0, 3).map(([id, r]) => `${id}: ${r.status} ${JSON.stringify(r.error)}`);
    return [
      { scenario: 'Worker SIGKILL mid-solve', measure: `runs succeeded of ${ids.length} (${opts.kills} kills, ${killed.length} runs interrupted)`, value: `${succeeded}${failures.length ? ` — ${failures.join('; ')}` : ''}`, pass: succeeded === ids.length },
      { scenario: 'Worker SIGKILL mid-solve', measure: 'runs retried after a kill (attempts > 1)', value: String(retried), pass: retried >= 1 },
      { scenario: 'Worker SIGKILL mid-solve', measure: 'runs reported succeeded more than once (distinct webhook messages)', value: String(twice), pass: twice === 0 && perRun.size === ids.length },
      { scenario: 'Worker SIGKILL mid-solve', measure: 'usage rows (one per run)', value: String(usage.rows[0].n), pass: usage.rows[0].n === ids.length },
      {
        scenario: 'Worker SIGKILL mid-solve',
        measure: 'time from the SIGKILL to the orphaned run back in the queue, per kill that left a run behind (target ≤ 15 s)',
        value: requeuedAfter.map((s) => `${s.toFixed(2)} s`).join(', '),
        pass: requeuedAfter.length > 0 && requeuedAfter.every((s) => s <= 15),
      },
      {
        scenario: 'Worker SIGKILL mid-solve',
        measure: 'time from the SIGKILL to the run solving again on another worker, per kill',
        value: resumedAfter.map((s) => `${s.toFixed(2)} s`).join(', '),
        pass: null,
      },
      { scenario: 'Worker SIGKILL mid-solve', measure: 'wall time', value: `${seconds.toFixed(0)} s`, pass: null },
    ];
  } finally {
    await Promise.all(workers.map((w) => w.child.kill()));
    await api.child.kill();
    await receiver.close();
  }
}
