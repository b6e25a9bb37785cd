// `npm run test:soak`: the long fault and load scripts (bounded in time, loopback only). Needs DATABASE_URL, GW_PG_DIR and GW_PG_BIN, which
// scripts/with-test-db.mjs provides for a throwaway cluster. Scenario sizes can be lowered with
// SOAK_RUNS (crash runs), SOAK_SOLVES (consecutive solves) and SOAK_LOAD_SECONDS; FUZZ_RUNS is
// for the fuzz tests (e.g. FUZZ_RUNS=5000 npx vitest run tests/fuzz).
import { createContext } from '../../api/src/bootstrap';
import { loadConfig } from '../../api/src/config';
import { childEnv, createSoakTenant, migrate, newPool } from './lib/harness';
import { renderResults, writeResults, type ResultRow } from './lib/results';
import { smallSiteSpec } from './lib/specs';
import { databaseOutageScenario } from './scenarios/database-outage';
import { hardeningScenario } from './scenarios/hardening';
import { loadScenario } from './scenarios/load';
import { manySolvesScenario } from './scenarios/many-solves';
import { solverFaultScenario } from './scenarios/solver-fault';
import { throughputScenario } from './scenarios/throughput';
import { workerCrashScenario } from './scenarios/worker-crash';

const { DATABASE_URL, GW_PG_DIR, GW_PG_BIN } = process.env;
if (!DATABASE_URL || !GW_PG_DIR || !GW_PG_BIN) throw new Error('run through `npm run test:soak` (DATABASE_URL, GW_PG_DIR and GW_PG_BIN are needed)');
const only = process.argv.slice(2);
const want = (name: string) => only.length === 0 || only.includes(name);
const num = (v: string | undefined, d: number) => (v && Number(v) > 0 ? Number(v) : d);

const startedAt = new Date();
await migrate(DATABASE_URL);
const ctx = await createContext(loadConfig(childEnv(DATABASE_URL, { LOG_LEVEL: 'silent' })));
const pool = newPool(DATABASE_URL);
const rows: ResultRow[] = [];

async function scenario(name: string, limitMs: number, fn: () => Promise<ResultRow[]>) {
  if (!want(name)) return;
  process.stderr.write(`── soak: ${name}\n`);
  const t0 = Date.now();
  let timer: NodeJS.Timeout | undefined;
  try {
    const timeout = new Promise<never>((_r, reject) => {
      timer = setTimeout(() => reject(new Error(`did not finish within ${limitMs / 1000} s`)), limitMs);
    });
    const got = await Promise.race([fn(), timeout]);
    rows.push(...got);
  } catch (err) {
    rows.push({ scenario: name, measure: 'error', value: String((err as Error).message).split('\n')[0].slice(0, 300), pass: false });
  } finally {
    clearTimeout(timer);
    process.stderr.write(`   ${((Date.now() - t0) / 1000).toFixed(0)} s\n`);
  }
}

let n = 0;
const tenant = async (label: string) => createSoakTenant(ctx, `soak-${label}-${++n}`);

await scenario('load', 10 * 60_000, async () => (await loadScenario({ pool, databaseUrl: DATABASE_URL, tenant: await tenant('load'), durationSeconds: num(process.env.SOAK_LOAD_SECONDS, 10) })).rows);
await scenario('throughput', 20 * 60_000, async () =>
  throughputScenario({ pool, databaseUrl: DATABASE_URL, tenant: await tenant('tp'), runsPerWorker: 40, spec: (name) => smallSiteSpec(name), specLabel: 'small site spec (24 h, 2 units, battery)' }),
);
await scenario('crash', 30 * 60_000, async () => workerCrashScenario({ ctx, pool, databaseUrl: DATABASE_URL, tenant: await tenant('crash'), runs: num(process.env.SOAK_RUNS, 100), kills: 3 }));
await scenario('outage', 10 * 60_000, async () => databaseOutageScenario({ pool, databaseUrl: DATABASE_URL, pgBin: GW_PG_BIN, pgDir: GW_PG_DIR, tenant: await tenant('outage'), outageSeconds: 10 }));
await scenario('solver-fault', 10 * 60_000, async () => solverFaultScenario({ pool, databaseUrl: DATABASE_URL, tenant: await tenant('fault') }));
await scenario('hardening', 15 * 60_000, async () => hardeningScenario({ ctx, databaseUrl: DATABASE_URL, tenant: await tenant('hardening') }));
await scenario('solves', 60 * 60_000, async () => manySolvesScenario(num(process.env.SOAK_SOLVES, 5000)));

const seconds = (Date.now() - startedAt.getTime()) / 1000;
const markdown = renderResults(rows, startedAt, seconds);
process.stdout.write(`\n${markdown}\n`);
process.stderr.write(`written to ${writeResults(markdown)}\n`);
await pool.end().catch(() => {});
await ctx.db.destroy().catch(() => {});
process.exit(rows.some((r) => r.pass === false) ? 1 : 0);
