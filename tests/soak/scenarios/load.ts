// autocannon at 50 connections on loopback: Gridwright's GET /v1/runs/{id} and POST /v1/runs
// (with a key whose rate limit is raised) beside a bare Express JSON route, as ratios.
import type pg from 'pg';
import { spawnTs } from '../lib/child-process';
import { startApi, startWorker, submitRun, waitAllTerminal, type SoakTenant } from '../lib/harness';
import { measure, type LoadFigures } from '../lib/load';
import type { ResultRow } from '../lib/results';
import { smallSiteSpec } from '../lib/specs';

const fmt = (f: LoadFigures) => `${f.requestsPerSecond.toFixed(0)} req/s, p50 ${f.p50Ms} ms, p99 ${f.p99Ms} ms, ${f.errors} errors, ${f.non2xx} non-2xx of ${f.requests}`;

export async function loadScenario(opts: { pool: pg.Pool; databaseUrl: string; tenant: SoakTenant; durationSeconds: number }): Promise<{ rows: ResultRow[]; figures: LoadFigures[] }> {
  const { pool, databaseUrl, tenant } = opts;
  const api = await startApi(databaseUrl);
  const bare = spawnTs('tests/soak/lib/serve-bare.ts', {}, 'bare');
  const [, barePort] = await bare.waitForLine(/listening (\d+)/);
  const bareBase = `http://127.0.0.1:${barePort}`;
  try {
    // One finished run to read back, solved by a short-lived worker.
    const worker = await startWorker(databaseUrl, 1, 'load-worker');
    const first = await submitRun(api.base, tenant.key, smallSiteSpec('load soak read-back'));
    if (first.status !== 202) throw new Error(`POST /v1/runs answered ${first.status}: ${JSON.stringify(first.body).slice(0, 300)}`);
    await waitAllTerminal(pool, [first.body.id], 120_000);
    await worker.child.kill();

    const auth = { authorization: `Bearer ${tenant.key}` };
    const body = JSON.stringify(smallSiteSpec('load soak submission'));
    const d = opts.durationSeconds;
    const figures: LoadFigures[] = [];
    figures.push(await measure('bare GET', { url: `${bareBase}/bare/${first.body.id}`, durationSeconds: d }));
    figures.push(await measure('GET /v1/runs/{id}', { url: `${api.base}/v1/runs/${first.body.id}`, headers: auth, durationSeconds: d }));
    figures.push(await measure('bare POST', { url: `${bareBase}/bare`, method: 'POST', headers: { 'content-type': 'application/json' }, body, durationSeconds: d }));
    figures.push(await measure('POST /v1/runs', { url: `${api.base}/v1/runs`, method: 'POST', headers: { ...auth, 'content-type': 'application/json' }, body, durationSeconds: d }));
    const [bareGet, get, barePost, post] = figures;

    // The submissions are not solved: the load test measures the API, not the solver.
    await pool.query(`UPDATE runs SET status = 'cancelled', finished_at = now() WHERE tenant_id = $1 AND status = 'queued'`, [tenant.tenantId]);
    await pool.query(`DELETE FROM pgboss.job WHERE name = 'run-solve' AND state IN ('created', 'retry')`);

    const row = (m: string, v: string, pass: boolean | null = null): ResultRow => ({ scenario: 'Load, 50 connections, 127.0.0.1', measure: m, value: v, pass });
    return {
      figures,
      rows: [
        row('bare Express GET (JSON)', fmt(bareGet)),
        row('GET /v1/runs/{id} (API key)', fmt(get), get.errors === 0 && get.non2xx === 0),
        row('GET ratio to bare', `${((get.requestsPerSecond / bareGet.requestsPerSecond) * 100).toFixed(1)} % of the requests/s`),
        row('bare Express POST (JSON body)', fmt(barePost)),
        row('POST /v1/runs (API key)', fmt(post), post.errors === 0 && post.non2xx === 0),
        row('POST ratio to bare', `${((post.requestsPerSecond / barePost.requestsPerSecond) * 100).toFixed(1)} % of the requests/s`),
      ],
    };
  } finally {
    await bare.kill();
    await api.child.kill();
  }
}
