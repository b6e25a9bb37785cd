/**
 * `npm run bench` — one table, measured side by side in one run, written to tests/bench/RESULTS.md.
 * `npm run bench -- --quick` runs shortened versions of every section (a sanity check, < 2 min)
 * and only prints.
 *
 * Sections: each formulation reduction on vs off; monolithic vs rolling horizon and a rolling
 * 15-minute year; the proven bound of rolling solves (`rolling-bound.ts`); the island year with
 * fuel deliveries (`island-year.ts`); how rolling windows value stored product
 * (`store-valuation.ts`); HiGHS (the engine) vs GLPK (glpk.js on the plain formulation); the RSS of one
 * solver worker over many consecutive small solves; how fast one worker process drains the run
 * queue against the bound its solves set (`queue-throughput.ts`); API reads against a bare
 * Express route (`api-reads.ts`), both on a throwaway PostgreSQL; the warm engine against Debian's
 * CBC on day-ahead sites, the demo sites and the 10-unit system (`engine-vs-cbc.ts`); and the CLI's
 * fixed cost (`cli-startup.ts`).
 *
 * `--only=<section>,…` runs just those sections (reductions, rolling, solvers, rolling-bound,
 * island-year, store-valuation, memory, queue, api-reads, day-ahead, demo-sites, cli) and only prints.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { solveSite, type SiteSolution } from '../../api/src/engine/solve-site';
import { verifySchedule } from '../../api/src/engine/verify-schedule';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { defaultSolverThreads } from '../../api/src/solver/solver-threads';
import { solvePlain } from '../reference/support/plain-formulation';
import { ALL_REDUCTIONS_OFF, ALL_REDUCTIONS_ON, monolithic } from '../reference/support/specs';
import { apiReadsSection } from './api-reads';
import { cliSection } from './cli-startup';
import { dayAheadSection, demoSitesSection } from './engine-vs-cbc';
import { islandYearSection } from './island-year';
import { queueThroughputSection } from './queue-throughput';
import { resultRow, rollingBoundSection, type BenchSection, type SectionRow } from './rolling-bound';
import { gridTiedSite, smallSite, solarOnlySite, solarWeekSite } from './sites';
import { storeValuationSection } from './store-valuation';

const quick = process.argv.includes('--quick');
const only = process.argv.find((a) => a.startsWith('--only='))?.slice('--only='.length).split(',');
const wanted = (section: string) => !only || only.includes(section);

/** A row of the table: a section's row (rolling-bound.ts) with the section it belongs to. */
interface Row extends SectionRow {
  section: string;
}

/** The solver every section shares, as one worker process shares its threads among its runs. */
const solver = new HighsSolverPool({ size: defaultSolverThreads() });
const rows: Row[] = [];
const loadAtStart = os.loadavg()[0];
const summary: string[] = [];
const REDUCTIONS = ['sparseSets', 'tightBigM', 'scaling', 'relaxExclusivity', 'independentBlocks'] as const;

const f2 = (x: number | undefined) => (x === undefined ? '' : x.toFixed(2));
const fObj = (x: number | null | undefined) => (x === undefined ? '' : x === null ? '—' : x.toFixed(2));
const mb = (bytes: number) => `${(bytes / 2 ** 20).toFixed(0)} MB`;

function log(line: string): void {
  process.stderr.write(`${line}\n`);
}

/** Every engine result in the bench must pass the independent verifier, or the figure is void. */
function checked(spec: ResolvedSiteSpec, r: SiteSolution): SiteSolution {
  if (!r.schedule) return r;
  const v = verifySchedule(spec, r.schedule);
  if (!v.ok) throw new Error(`bench schedule failed verification: ${v.violations[0].message}`);
  return r;
}

function engineRow(section: string, variant: string, r: SiteSolution, wallS: number, note: string): Row {
  return { section, ...resultRow(variant, r, wallS, note) };
}

/** Solves, checks the schedule, and measures the wall time from the call to the verified result. */
async function timed(spec: ResolvedSiteSpec): Promise<{ r: SiteSolution; seconds: number }> {
  const started = performance.now();
  const r = checked(spec, await solveSite(spec, { solver }));
  return { r, seconds: (performance.now() - started) / 1000 };
}

const sameWithin = (a: number | null, b: number | null, rel: number) =>
  a !== null && b !== null && Math.abs(a - b) <= rel * Math.max(1, Math.abs(a), Math.abs(b));

async function reductionsSection(): Promise<void> {
  const full = solarWeekSite();
  const days = quick ? 2 : 7;
  const spec: ResolvedSiteSpec = quick ? cutSteps(full, days * 96) : full;
  // Best of three in a full run: a busy machine slows single runs unevenly.
  const repeats = quick ? 1 : 3;
  const section = `Reductions: ${days} d × 15 min solar-only, 3 units${quick ? '' : ` (best of ${repeats})`}`;
  const gap = spec.solver.mipGap;
  const run = async (label: string, reductions: ResolvedSiteSpec['solver']['reductions']) => {
    let best: { label: string; r: SiteSolution; seconds: number } | null = null;
    for (let i = 0; i < repeats; i++) {
      log(`reductions: ${label} (${i + 1}/${repeats})`);
      const { r, seconds } = await timed(monolithic(spec, reductions, gap));
      if (!best || seconds < best.seconds) best = { label, r, seconds };
    }
    return best!;
  };
  const on = await run('every reduction on', ALL_REDUCTIONS_ON);
  const off = await run('every reduction off', ALL_REDUCTIONS_OFF);
  const variants = [on, off];
  for (const name of REDUCTIONS) variants.push(await run(`only ${name} off`, { ...ALL_REDUCTIONS_ON, [name]: false }));
  for (const name of REDUCTIONS) variants.push(await run(`only ${name} on`, { ...ALL_REDUCTIONS_OFF, [name]: true }));
  const reference = off.r.objective.value;
  for (const v of variants) {
    const same = sameWithin(v.r.objective.value, reference, gap) ? 'same optimum' : 'DIFFERENT optimum';
    const blocks = v.r.model.windows[0]?.blocks ?? 1;
    rows.push(engineRow(section, v.label, v.r, v.seconds, `${same} (gap ${gap})${blocks > 1 ? `; ${blocks} independent blocks` : ''}`));
  }
  const ratio = off.seconds / on.seconds;
  rows.push({ section, variant: 'speed-up, all on vs all off', note: `${ratio.toFixed(2)}× (wall ${f2(off.seconds)} s → ${f2(on.seconds)} s; target ≥ 5×)` });
  summary.push(`Reductions (${days} d solar-only): all-off/all-on wall-time ratio ${ratio.toFixed(2)}× — target ≥ 5× ${ratio >= 5 ? 'met' : 'NOT met'}.`);
}

/** The first `steps` steps of a spec (the quick variants). */
function cutSteps(spec: ResolvedSiteSpec, steps: number): ResolvedSiteSpec {
  const cut = (xs: number[]) => xs.slice(0, steps);
  return {
    ...spec,
    horizon: { ...spec.horizon, steps },
    supply: { availableKw: cut(spec.supply.availableKw) },
    siteLoad: { ...spec.siteLoad, kw: cut(spec.siteLoad.kw) },
    grid: { ...spec.grid, importPrice: cut(spec.grid.importPrice), exportPrice: cut(spec.grid.exportPrice) },
  };
}

async function rollingSection(): Promise<void> {
  const days = quick ? 7 : 30;
  const spec = gridTiedSite(days, 60);
  const section = `Rolling vs monolithic: ${days} d hourly, grid-tied + battery`;
  log('rolling: monolithic');
  const mono = await timed(monolithic(spec, ALL_REDUCTIONS_ON, spec.solver.mipGap));
  log('rolling: rolling');
  const rolling = await timed({ ...spec, solver: { ...spec.solver, mode: 'rolling' } });
  const ratio = (rolling.r.objective.value ?? Number.NaN) / (mono.r.objective.value ?? Number.NaN);
  rows.push(engineRow(section, 'monolithic', mono.r, mono.seconds, `gap ${mono.r.objective.gap?.toExponential(1) ?? '—'}`));
  rows.push(
    engineRow(section, `rolling (${rolling.r.model.windows.length} windows of ${spec.solver.window.windowSteps}, commit ${spec.solver.window.commitSteps})`, rolling.r, rolling.seconds, `objective ratio rolling/monolithic ${ratio.toFixed(5)}`),
  );
  summary.push(`Rolling vs monolithic (${days} d hourly): objective ratio ${ratio.toFixed(5)}, wall ${f2(mono.seconds)} s → ${f2(rolling.seconds)} s.`);

  // The rolling design, variant by variant on one quarter: one sequence with integer lookahead
  // (the plain rolling horizon), relaxed lookahead, and relaxed lookahead in parallel segments.
  const quarterDays = quick ? 10 : 90;
  const quarter = gridTiedSite(quarterDays, 15);
  const designSection = `Rolling design: ${quarterDays} d × 15 min, grid-tied + battery`;
  const designs: [string, Partial<ResolvedSiteSpec['solver']['window']>][] = [
    ['one sequence, integer lookahead', { segmentWindows: 0, lookahead: 'integer' }],
    ['one sequence, relaxed lookahead', { segmentWindows: 0, lookahead: 'relaxed' }],
    [`segments of ${quick ? 4 : 32} windows, relaxed lookahead (default)`, { segmentWindows: quick ? 4 : 32, lookahead: 'relaxed' }],
  ];
  let plain: { r: SiteSolution; seconds: number } | null = null;
  for (const [label, window] of designs) {
    log(`rolling design: ${label}`);
    const d = await timed({ ...quarter, solver: { ...quarter.solver, mode: 'rolling', timeLimitSeconds: 900, window: { ...quarter.solver.window, ...window } } });
    plain ??= d;
    const vs = `objective ratio to the first ${(d.r.objective.value! / plain.r.objective.value!).toFixed(5)}, wall ratio ${(plain.seconds / d.seconds).toFixed(2)}×`;
    rows.push(engineRow(designSection, label, d.r, d.seconds, `${d.r.model.segments} segment(s); ${vs}`));
  }

  const yearDays = quick ? 7 : 365;
  const year = gridTiedSite(yearDays, 15);
  const yearSection = `Rolling: ${yearDays} d × 15 min (${year.horizon.steps} steps)`;
  log(`rolling: ${year.horizon.steps} steps`);
  const yr = await timed({ ...year, solver: { ...year.solver, mode: 'rolling', timeLimitSeconds: 900 } });
  const windows = yr.r.model.windows.filter((w) => w.kind === 'window').length;
  const probes = yr.r.model.windows.length - windows;
  const done = `${windows} windows, ${yr.r.model.segments} segments, ${probes} seam probes`;
  rows.push(engineRow(yearSection, `rolling (${done})`, yr.r, yr.seconds, `wall incl. verification; target ≤ 60 s`));
  summary.push(`Rolling ${year.horizon.steps} steps: ${yr.r.outcome}, ${done}, ${f2(yr.seconds)} s wall — target ≤ 60 s ${yr.r.outcome !== 'no-solution' && yr.seconds <= 60 ? 'met' : 'NOT met'}${quick ? ' (quick: 7 days only)' : ''}.`);

  // A site without storage falls apart into independent days: solved whole and exactly.
  const solarDays = quick ? 14 : 365;
  const solarYear = solarOnlySite(solarDays);
  const solarSection = `Monolithic in independent blocks: ${solarDays} d × 15 min solar-only, 3 units`;
  log(`blocks: ${solarYear.horizon.steps} steps`);
  const sy = await timed(monolithic(solarYear, ALL_REDUCTIONS_ON, solarYear.solver.mipGap));
  rows.push(engineRow(solarSection, `monolithic, ${sy.r.model.windows[0].blocks} blocks`, sy.r, sy.seconds, `gap ${sy.r.objective.gap?.toExponential(1) ?? '—'}`));
  summary.push(`Solar-only ${solarDays} d in independent blocks: ${sy.r.outcome} (gap ${sy.r.objective.gap?.toExponential(1)}), ${f2(sy.seconds)} s wall.`);
}

async function solverSection(): Promise<void> {
  const sizes = quick ? [24, 48] : [24, 48, 96];
  const cap = quick ? 10 : 60;
  const section = `HiGHS (engine) vs GLPK (plain model), GLPK capped at ${cap} s`;
  for (const steps of sizes) {
    const spec = smallSite(steps);
    log(`solvers: ${steps} steps`);
    const { r: engine, seconds } = await timed(monolithic(spec, ALL_REDUCTIONS_ON, spec.solver.mipGap));
    rows.push(engineRow(section, `HiGHS, ${steps} steps`, engine, seconds, ''));
    const plain = await solvePlain(spec, { mipGap: spec.solver.mipGap, timeLimitSeconds: cap });
    const same = plain.status === 'optimal' && sameWithin(plain.objective, engine.objective.value, 1e-5) ? 'same optimum' : plain.status === 'optimal' ? 'DIFFERENT optimum' : 'no proof within cap';
    rows.push({
      section,
      variant: `GLPK, ${steps} steps`,
      solveS: plain.seconds,
      wallS: plain.seconds,
      objective: plain.status === 'optimal' || plain.status === 'feasible' ? plain.objective : null,
      note: `${plain.status}; ${same}; ${(plain.seconds / Math.max(1e-3, seconds)).toFixed(0)}× HiGHS's wall time`,
    });
  }
}

async function memorySection(): Promise<void> {
  const total = quick ? 300 : 5000;
  const every = quick ? 100 : 1000;
  // One worker for the whole run (no recycling), so growth of one WebAssembly instance shows.
  const pool = new HighsSolverPool({ size: 1, solvesPerWorker: total + 1 });
  const spec = smallSite(4, 9);
  const section = `Memory: ${total} consecutive ${spec.horizon.steps}-step solves, one worker`;
  try {
    await solveSite(spec, { solver: pool });
    const rss0 = process.memoryUsage().rss;
    rows.push({ section, variant: 'start (after one warm-up solve)', note: `RSS ${mb(rss0)}` });
    let last = performance.now();
    let peak = rss0;
    for (let i = 1; i <= total; i++) {
      await solveSite(spec, { solver: pool });
      if (i % every === 0 || i === total) {
        const rss = process.memoryUsage().rss;
        peak = Math.max(peak, rss);
        const ms = (performance.now() - last) / Math.min(every, i);
        rows.push({ section, variant: `after ${i} solves`, note: `RSS ${mb(rss)} (${rss >= rss0 ? '+' : ''}${mb(rss - rss0)}); ${ms.toFixed(1)} ms per solve` });
        log(`memory: ${i} solves, RSS ${mb(rss)}`);
        last = performance.now();
      }
    }
    const end = process.memoryUsage().rss;
    summary.push(`Memory: ${total} solves in one worker without a crash; RSS ${mb(rss0)} → ${mb(end)} (peak ${mb(peak)}).`);
  } catch (e) {
    rows.push({ section, variant: 'FAILED', note: (e as Error).message });
    summary.push(`Memory: FAILED — ${(e as Error).message}`);
  } finally {
    await pool.close();
  }
}

async function queueSection(): Promise<void> {
  const section = 'Queue: small runs through one worker process';
  try {
    const queue = await queueThroughputSection({ runs: quick ? 40 : 200, warmUp: quick ? 10 : 20 });
    for (const r of queue.rows) rows.push({ section, variant: r.variant, wallS: r.wallS, note: r.note });
    summary.push(queue.summary);
  } catch (e) {
    rows.push({ section, variant: 'FAILED', note: (e as Error).message });
    summary.push(`Queue: FAILED — ${(e as Error).message}`);
  }
}

async function apiReads(): Promise<void> {
  const section = 'API reads: autocannon, 50 connections, loopback';
  const result = await apiReadsSection({ quick, log });
  for (const row of result.rows) rows.push({ section, ...row });
  summary.push(...result.summary);
}

/** A section kept in its own file: its rows and summary lines, as they are. */
function addSection(result: BenchSection): void {
  for (const row of result.rows) rows.push({ section: result.section, ...row });
  summary.push(...result.summary);
}

function machine(): string[] {
  const cpu = /model name\s*:\s*(.+)/.exec(readFileSync('/proc/cpuinfo', 'utf8'))?.[1] ?? os.cpus()[0]?.model ?? 'unknown';
  const nproc = execFileSync('nproc', { encoding: 'utf8' }).trim();
  return [
    `- Date: ${new Date().toISOString()}`,
    `- Machine: ${cpu}, nproc ${nproc}, ${mb(os.totalmem())} RAM`,
    `- Node ${process.version}, ${quick ? 'quick run (`--quick`)' : 'full run'}, ${defaultSolverThreads()} solver threads`,
    // Other work on the machine slows every figure; the load average says how busy it was.
    `- Load average (1 min) at start ${loadAtStart.toFixed(1)}, at end ${os.loadavg()[0].toFixed(1)}`,
  ];
}

function table(): string {
  const head = '| Section | Variant | Binaries | Nonzeros | Build s | Solve s | Wall s | Objective | Notes |\n|---|---|---:|---:|---:|---:|---:|---:|---|';
  const body = rows.map((r) => `| ${r.section} | ${r.variant} | ${r.binaries ?? ''} | ${r.nonzeros ?? ''} | ${f2(r.buildS)} | ${f2(r.solveS)} | ${f2(r.wallS)} | ${fObj(r.objective)} | ${r.note} |`);
  return [head, ...body].join('\n');
}

async function main(): Promise<void> {
  const started = performance.now();
  // Load the solver worker and warm it on models of the sizes measured below: V8 first runs
  // WebAssembly in its baseline tier and optimises the hot HiGHS code only once it has run a
  // while, so the first sizeable solve of a process took 3–6× longer than the same solve
  // repeated (measured on the reductions site). Without this the section measured first pays for it.
  // Every solver thread is warmed: the week split into days keeps all of them busy.
  await solveSite(smallSite(6), { solver });
  for (let i = 0; i < (quick ? 1 : 3); i++) await solveSite(monolithic(solarWeekSite(), ALL_REDUCTIONS_ON, 1e-4), { solver });
  await solveSite(monolithic(cutSteps(gridTiedSite(2, 15), 144), ALL_REDUCTIONS_OFF, 1e-3), { solver });
  if (wanted('reductions')) await reductionsSection();
  if (wanted('rolling')) await rollingSection();
  if (wanted('solvers')) await solverSection();
  if (wanted('rolling-bound')) addSection(await rollingBoundSection({ solver, quick, log }));
  if (wanted('island-year')) addSection(await islandYearSection({ solver, quick, log }));
  if (wanted('store-valuation')) addSection(await storeValuationSection({ solver, quick, log }));
  if (wanted('memory')) await memorySection();
  if (wanted('queue')) await queueSection();
  if (wanted('api-reads')) await apiReads();
  if (wanted('day-ahead')) addSection({ section: 'Day-ahead: warm engine vs Debian CBC 2.10 on the plain formulation', ...(await dayAheadSection({ quick, log, solver })) });
  if (wanted('demo-sites')) addSection({ section: 'Demo sites and 10-unit system: engine vs Debian CBC 2.10', ...(await demoSitesSection({ quick, log, solver })) });
  if (wanted('cli')) addSection({ section: 'CLI fixed cost: one-step spec, whole process', ...cliSection({ quick, log }) });
  const seconds = (performance.now() - started) / 1000;
  const md = [
    '# Gridwright benchmark results',
    '',
    'Written by `npm run bench` (tests/bench/run.ts). Sites are invented and generated deterministically',
    '(tests/bench/sites.ts). Every engine schedule below passed the independent verifier. "Build s" and',
    '"Solve s" are the engine\'s reported model-building and solver seconds, summed over windows and blocks',
    '(parallel parts overlap, so they can exceed the elapsed time); "Wall s" is the elapsed time from the',
    'call to the verified result, and every comparison uses it. GLPK times are its in-process solve of',
    'the plain formulation (tests/reference/support/plain-formulation.ts). API reads are requests per second',
    'from autocannon against an API process with production settings and, in the same run, against a bare',
    'Express app serving the same JSON (tests/bench/api-reads.ts).',
    '',
    ...machine(),
    `- Total bench time: ${seconds.toFixed(0)} s`,
    '',
    table(),
    '',
    '## Summary',
    '',
    ...summary.map((s) => `- ${s}`),
    '',
  ].join('\n');
  process.stdout.write(`${table()}\n\n${summary.join('\n')}\n`);
  // A quick or partial run is a check: it prints, but never replaces the recorded full results.
  if (!quick && !only) writeFileSync(path.join(import.meta.dirname, 'RESULTS.md'), md);
  log(`bench finished in ${seconds.toFixed(0)} s`);
  process.exit(0);
}

void main();
