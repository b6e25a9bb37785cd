/**
 * The API-reads section of `npm run bench`: autocannon at 50 connections on loopback, side by side
 * in one run, against a bare Express app serving a JSON body of the same size and against
 * Gridwright's `GET /v1/runs/{id}` with an API key whose plan's rate limit does not bind. The API
 * runs as its own process with production settings (NODE_ENV=production, LOG_LEVEL=info) on a
 * throwaway PostgreSQL cluster started here. `tsx tests/bench/api-reads.ts [--quick]` runs this
 * section alone and prints it.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { ensurePostgresInstalled, startCluster } from '../../scripts/lib/postgres.mjs';
import { spawnTs } from '../soak/lib/child-process';
import { createSoakTenant, migrate, newPool, soakContext, startApi, startWorker, submitRun, waitAllTerminal } from '../soak/lib/harness';
import { measure, type LoadFigures } from '../soak/lib/load';
import { smallSiteSpec } from '../soak/lib/specs';

export interface ApiReadsRow {
  variant: string;
  note: string;
}

export interface ApiReadsResult {
  rows: ApiReadsRow[];
  summary: string[];
}

const CONNECTIONS = 50;
const TARGET = 0.5;

const fmt = (f: LoadFigures) => `${f.requestsPerSecond.toFixed(0)} req/s, p50 ${f.p50Ms} ms, p99 ${f.p99Ms} ms, ${f.errors} errors, ${f.non2xx} non-2xx of ${f.requests}`;
/** The middle of an odd count of values. */
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[(xs.length - 1) >> 1]!;
/** The round whose requests/s is the median of all rounds. */
const medianRound = (xs: LoadFigures[]) => xs.find((x) => x.requestsPerSecond === median(xs.map((r) => r.requestsPerSecond)))!;

/**
 * Autocannon on a bare app serving the same JSON and on Gridwright's route, alternating (bare, API,
 * bare, API…) with the same connections and duration. The ratio is the median of each round's API
 * figure over the bare figure just before it, so a busy spell on the shared machine weighs on both
 * sides of a pair; the figures shown are each side's median round.
 */
async function compareWithBare(
  tmp: string,
  children: { kill(): Promise<unknown> }[],
  opts: { url: string; headers: Record<string, string>; status: string; seconds: number; rounds: number; log: (line: string) => void },
): Promise<{ bare: LoadFigures; api: LoadFigures; ratio: number; clean: boolean; bytes: number }> {
  const body = await (await fetch(opts.url, { headers: opts.headers })).text();
  if (JSON.parse(body).status !== opts.status) throw new Error(`the run to read back is not ${opts.status}: ${body.slice(0, 300)}`);
  const bodyFile = path.join(tmp, `${opts.status}.json`);
  writeFileSync(bodyFile, body);
  const bare = spawnTs('tests/soak/lib/serve-bare.ts', { BARE_GET_BODY: bodyFile }, 'bare');
  children.push(bare);
  const [, barePort] = await bare.waitForLine(/listening (\d+)/);
  const bareUrl = `http://127.0.0.1:${barePort}/bare/${JSON.parse(body).id}`;
  const bareBody = await (await fetch(bareUrl)).text();
  if (bareBody.length !== body.length) throw new Error(`the bare body has ${bareBody.length} bytes, the run ${body.length}`);
  opts.log(`api reads (${opts.status}): warm-up`);
  await measure('bare warm-up', { url: bareUrl, connections: CONNECTIONS, durationSeconds: 2 });
  await measure('api warm-up', { url: opts.url, headers: opts.headers, connections: CONNECTIONS, durationSeconds: 2 });
  const bareRuns: LoadFigures[] = [];
  const apiRuns: LoadFigures[] = [];
  for (let i = 0; i < opts.rounds; i++) {
    opts.log(`api reads (${opts.status}): round ${i + 1}/${opts.rounds}`);
    bareRuns.push(await measure('bare', { url: bareUrl, connections: CONNECTIONS, durationSeconds: opts.seconds }));
    apiRuns.push(await measure('api', { url: opts.url, headers: opts.headers, connections: CONNECTIONS, durationSeconds: opts.seconds }));
  }
  await bare.kill();
  const ratio = median(apiRuns.map((a, i) => a.requestsPerSecond / bareRuns[i]!.requestsPerSecond));
  return { bare: medianRound(bareRuns), api: medianRound(apiRuns), ratio, clean: apiRuns.every((r) => r.errors === 0 && r.non2xx === 0), bytes: body.length };
}

export async function apiReadsSection(opts: { quick: boolean; log: (line: string) => void }): Promise<ApiReadsResult> {
  const { quick, log } = opts;
  const seconds = quick ? 3 : 6;
  // An odd count, for a median.
  const rounds = quick ? 1 : 5;
  const tmp = mkdtempSync(path.join(os.tmpdir(), 'gw-bench-reads-'));
  const cluster = await startCluster({ bin: ensurePostgresInstalled(log), dir: path.join(tmp, 'postgres'), ephemeral: true, log });
  const pool = newPool(cluster.url);
  const children: { kill(): Promise<unknown> }[] = [];
  try {
    await migrate(cluster.url);
    const ctx = await soakContext(cluster.url);
    const tenant = await createSoakTenant(ctx, 'bench-reads');
    await ctx.db.destroy();

    const api = await startApi(cluster.url, { LOG_LEVEL: 'info' });
    children.push(api.child);
    const worker = await startWorker(cluster.url, 1, 'bench-worker');
    children.push(worker.child);
    const submitted = await submitRun(api.base, tenant.key, smallSiteSpec('bench read-back'));
    if (submitted.status !== 202) throw new Error(`POST /v1/runs answered ${submitted.status}: ${JSON.stringify(submitted.body).slice(0, 300)}`);
    const runId: string = submitted.body.id;
    await waitAllTerminal(pool, [runId], 120_000);
    await worker.child.kill();

    // Both are kept by the process: the finished run for good, the queued one until its row changes.
    const queued = await submitRun(api.base, tenant.key, smallSiteSpec('bench queued read-back'));
    if (queued.status !== 202) throw new Error(`POST /v1/runs answered ${queued.status}: ${JSON.stringify(queued.body).slice(0, 300)}`);

    const rows: ApiReadsRow[] = [];
    const summary: string[] = [];
    for (const [label, id, status] of [
      ['succeeded 24-step run', runId, 'succeeded'],
      ['queued run', queued.body.id as string, 'queued'],
    ] as const) {
      const compared = await compareWithBare(tmp, children, { url: `${api.base}/v1/runs/${id}`, headers: { authorization: `Bearer ${tenant.key}` }, status, seconds, rounds, log });
      const of = rounds > 1 ? ` (median of ${rounds} × ${seconds} s)` : ` (${seconds} s)`;
      rows.push(
        { variant: `bare Express GET, the same JSON (${compared.bytes} bytes)${of}`, note: fmt(compared.bare) },
        { variant: `GET /v1/runs/{id}, API key, ${label}${of}`, note: `${fmt(compared.api)}${compared.clean ? '' : '; NOT every answer was a 200'}` },
        { variant: `ratio to bare Express (${status} run)`, note: `${(compared.ratio * 100).toFixed(1)} % of the requests/s (median of the rounds' ratios); target ≥ ${TARGET * 100} %` },
      );
      summary.push(
        `API reads, ${label} (${CONNECTIONS} connections): GET /v1/runs/{id} at ${(compared.ratio * 100).toFixed(1)} % of a bare Express route serving the same JSON (${compared.api.requestsPerSecond.toFixed(0)} vs ${compared.bare.requestsPerSecond.toFixed(0)} req/s) — target ≥ ${TARGET * 100} % ${compared.ratio >= TARGET && compared.clean ? 'met' : 'NOT met'}.`,
      );
    }
    return { rows, summary };
  } finally {
    for (const c of children.reverse()) await c.kill();
    await pool.end().catch(() => {});
    cluster.stop();
    rmSync(tmp, { recursive: true, force: true });
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const result = await apiReadsSection({ quick: process.argv.includes('--quick'), log: (line) => process.stderr.write(`${line}\n`) });
  process.stdout.write(`${result.rows.map((r) => `${r.variant}: ${r.note}`).join('\n')}\n${result.summary.join('\n')}\n`);
  process.exit(0);
}
