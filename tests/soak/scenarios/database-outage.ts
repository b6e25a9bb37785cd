// PostgreSQL stopped for ten seconds under a steady stream of submissions: the API must answer
// 503 problem+json (readiness too), recover by itself, and every run it accepted must complete.
import type pg from 'pg';
import { startCluster } from '../../../scripts/lib/postgres.mjs';
import { sleep } from '../lib/child-process';
import { runStatuses, startApi, startWorker, submitRun, waitAllTerminal, type SoakTenant } from '../lib/harness';
import type { ResultRow } from '../lib/results';
import { smallSiteSpec } from '../lib/specs';

export async function databaseOutageScenario(opts: { pool: pg.Pool; databaseUrl: string; pgBin: string; pgDir: string; tenant: SoakTenant; outageSeconds: number }): Promise<ResultRow[]> {
  const { pool, databaseUrl, tenant } = opts;
  const cluster = await startCluster({ bin: opts.pgBin, dir: opts.pgDir, ephemeral: true });
  const api = await startApi(databaseUrl);
  const worker = await startWorker(databaseUrl, 1, 'outage-worker');
  const accepted: string[] = [];
  const during = { submissions: 0, status503: 0, problemJson503: 0, other5xx: 0, readyz503: 0, readyzOther: 0, refusedConnections: 0 };
  let phase = 'before' as 'before' | 'down' | 'after';
  let restartedAt: number;
  let firstAcceptedAfter = 0;
  let stop = false;

  const submitLoop = (async () => {
    let i = 0;
    while (!stop) {
      try {
        const res = await submitRun(api.base, tenant.key, smallSiteSpec(`outage soak ${i++}`));
        if (res.status === 202) {
          accepted.push(res.body.id);
          if (phase === 'after' && !firstAcceptedAfter) firstAcceptedAfter = Date.now();
        }
        if (phase === 'down') {
          during.submissions++;
          if (res.status === 503) {
            during.status503++;
            if (res.contentType.startsWith('application/problem+json')) during.problemJson503++;
          } else if (res.status >= 500) during.other5xx++;
        } else if (res.status >= 500 && phase === 'before') during.other5xx++;
      } catch {
        if (phase === 'down') during.refusedConnections++;
      }
      await sleep(100);
    }
  })();
  const readyLoop = (async () => {
    while (!stop) {
      const res = await fetch(`${api.base}/readyz`).catch(() => null);
      if (phase === 'down' && res) {
        if (res.status === 503) during.readyz503++;
        else during.readyzOther++;
      }
      await sleep(250);
    }
  })();

  try {
    await sleep(3_000);
    cluster.forceStop();
    phase = 'down';
    await sleep(opts.outageSeconds * 1000);
    phase = 'after';
    cluster.restart();
    restartedAt = Date.now();
    await sleep(10_000);
    stop = true;
    await Promise.all([submitLoop, readyLoop]);
    const workerAlive = worker.child.proc.exitCode === null && worker.child.proc.signalCode === null;
    const final = await waitAllTerminal(pool, accepted, 2 * 60_000).catch(async () => runStatuses(pool, accepted));
    const succeeded = [...final.values()].filter((r) => r.status === 'succeeded').length;
    const recovery = firstAcceptedAfter ? ((firstAcceptedAfter - restartedAt) / 1000).toFixed(1) : 'never';
    return [
      { scenario: `PostgreSQL stopped ${opts.outageSeconds} s under load`, measure: 'submissions during the outage answered 503 problem+json', value: `${during.problemJson503} of ${during.submissions}`, pass: during.submissions > 0 && during.problemJson503 === during.submissions },
      { scenario: `PostgreSQL stopped ${opts.outageSeconds} s under load`, measure: 'other 5xx answers (before or during)', value: String(during.other5xx), pass: during.other5xx === 0 },
      { scenario: `PostgreSQL stopped ${opts.outageSeconds} s under load`, measure: '/readyz during the outage', value: `${during.readyz503} × 503, ${during.readyzOther} × other`, pass: during.readyz503 > 0 && during.readyzOther === 0 },
      { scenario: `PostgreSQL stopped ${opts.outageSeconds} s under load`, measure: 'first accepted run after restart', value: `${recovery} s`, pass: firstAcceptedAfter > 0 },
      { scenario: `PostgreSQL stopped ${opts.outageSeconds} s under load`, measure: 'worker process still running after the outage', value: workerAlive ? 'yes' : `no — exited: ${worker.child.output().trim().split('\n').slice(-2).join(' | ').slice(0, 300)}`, pass: workerAlive },
      { scenario: `PostgreSQL stopped ${opts.outageSeconds} s under load`, measure: 'accepted runs that completed', value: `${succeeded} of ${accepted.length}`, pass: accepted.length > 0 && succeeded === accepted.length },
    ];
  } finally {
    stop = true;
    await worker.child.kill();
    await api.child.kill();
  }
}
