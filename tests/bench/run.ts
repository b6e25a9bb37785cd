/**
 * `npm run bench` — one table, measured side by side in one run, written to tests/bench/RESULTS.md.
 * `npm run bench -- --quick` runs shortened versions of every section (a sanity check, < 2 min)
 * and only prints.
 *
 * Sections: each formulation reduction on vs off; monolithic vs rolling horizon and a rolling
 * 15-minute year; HiGHS (the engine) vs GLPK (glpk.js on the plain formulation); and the RSS
 * of one solver worker over many consecutive small solves.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { RunResult } from '@gridwright/shared/run-result';
import { solveSite } from '../../api/src/engine/solve-site';
import { SolverPool } from '../../api/src/engine/solver-pool';
import { verifySchedule } from '../../api/src/engine/verify-schedule';
import { solvePlain } from '../reference/support/plain-formulation';
import { ALL_REDUCTIONS_OFF, ALL_REDUCTIONS_ON, monolithic } from '../reference/support/specs';
import { gridTiedSite, smallSite, solarWeekSite } from './sites';

const quick = process.argv.includes('--quick');

interface Row {
  section: string;
  variant: string;
  binaries?: number;
  nonzeros?: number;
  buildS?: number;
  solveS?: number;
  objective?: number | null;
  note: string;
}

const rows: Row[] = [];
const loadAtStart = os.loadavg()[0];
const summary: string[] = [];
const REDUCTIONS = ['sparseSets', 'tightBigM', 'scaling', 'relaxExclusivity'] as const;

const f2 = (x: number | undefined) => (x === undefined ? '' : x.toFixed(2));
const fObj = (x: number | null | undefined) => (x === undefined ? '' : x === null ? '—' : x.toFixed(2));
const mb = (bytes: number) => `${(bytes / 2 ** 20).toFixed(0)} MB`;

function log(line: string): void {
  process.stderr.write(`${line}\n`);
}

/** Every engine result in the bench must pass the independent verifier, or the figure is void. */
function checked(spec: ResolvedSiteSpec, r: RunResult): RunResult {
  if (!r.schedule) return r;
  const v = verifySchedule(spec, r.schedule);
  if (!v.ok) throw new Error(`bench schedule failed verification: ${v.violations[0].message}`);
  return r;
}

function engineRow(section: string, variant: string, r: RunResult, note: string): Row {
  return {
    section,
    variant,
    binaries: r.model.binaries,
    nonzeros: r.model.nonzeros,
    buildS: r.model.buildSeconds,
    solveS: r.model.solveSeconds,
    objective: r.objective.value,
    note: `${r.outcome}${note ? `; ${note}` : ''}`,
  };
}

const sameWithin = (a: number | null, b: number | null, rel: number) =>
  a !== null && b !== null && Math.abs(a - b) <= rel * Math.max(1, Math.abs(a), Math.abs(b));

async function reductionsSection(): Promise<void> {
  const full = solarWeekSite();
  const days = quick ? 2 : 7;
  const spec: ResolvedSiteSpec = quick ? cutSteps(full, days * 96) : full;
  const section = `Reductions: ${days} d × 15 min solar-only, 3 units${quick ? '' : ' (best of 2)'}`;
  const gap = spec.solver.mipGap;
  // Best of two in a full run: a busy machine slows single runs unevenly.
  const repeats = quick ? 1 : 2;
  const run = async (label: string, reductions: ResolvedSiteSpec['solver']['reductions']) => {
    let best: { label: string; r: RunResult; seconds: number } | null = null;
    for (let i = 0; i < repeats; i++) {
      log(`reductions: ${label} (${i + 1}/${repeats})`);
      const r = checked(spec, await solveSite(monolithic(spec, reductions, gap)));
      const seconds = r.model.buildSeconds + r.model.solveSeconds;
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
    rows.push(engineRow(section, v.label, v.r, `${same} (gap ${gap})`));
  }
  const ratio = off.seconds / on.seconds;
  rows.push({ section, variant: 'speed-up, all on vs all off', note: `${ratio.toFixed(2)}× (build + solve ${f2(off.seconds)} s → ${f2(on.seconds)} s; target ≥ 5×)` });
  summary.push(`Reductions (${days} d solar-only): all-off/all-on time ratio ${ratio.toFixed(2)}× — target ≥ 5× ${ratio >= 5 ? 'met' : 'NOT met'}.`);
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
  const mono = checked(spec, await solveSite(monolithic(spec, ALL_REDUCTIONS_ON, spec.solver.mipGap)));
  log('rolling: rolling');
  const rolling = checked(spec, await solveSite({ ...spec, solver: { ...spec.solver, mode: 'rolling' } }));
  const ratio = (rolling.objective.value ?? Number.NaN) / (mono.objective.value ?? Number.NaN);
  rows.push(engineRow(section, 'monolithic', mono, `gap ${mono.objective.gap?.toExponential(1) ?? '—'}`));
  rows.push(engineRow(section, `rolling (${rolling.model.windows.length} windows of ${spec.solver.window.windowSteps}, commit ${spec.solver.window.commitSteps})`, rolling, `objective ratio rolling/monolithic ${ratio.toFixed(5)}`));
  summary.push(`Rolling vs monolithic (${days} d hourly): objective ratio ${ratio.toFixed(5)}, time ${f2(mono.model.buildSeconds + mono.model.solveSeconds)} s → ${f2(rolling.model.buildSeconds + rolling.model.solveSeconds)} s.`);

  const yearDays = quick ? 7 : 365;
  const year = gridTiedSite(yearDays, 15);
  const yearSection = `Rolling: ${yearDays} d × 15 min (${year.horizon.steps} steps)`;
  log(`rolling: ${year.horizon.steps} steps`);
  const started = performance.now();
  const yr = checked(year, await solveSite({ ...year, solver: { ...year.solver, mode: 'rolling', timeLimitSeconds: 900 } }));
  const wall = (performance.now() - started) / 1000;
  const { windowSteps, commitSteps } = year.solver.window;
  const planned = Math.max(1, Math.ceil((year.horizon.steps - windowSteps) / commitSteps) + 1);
  const done = `${yr.model.windows.length} of ${planned} windows`;
  rows.push(engineRow(yearSection, `rolling (${done}, ${windowSteps}/${commitSteps} steps)`, yr, `wall ${f2(wall)} s incl. verification; target ≤ 60 s`));
  summary.push(`Rolling ${year.horizon.steps} steps: ${yr.outcome}, ${done}, ${f2(wall)} s wall — target ≤ 60 s ${yr.outcome !== 'no-solution' && wall <= 60 ? 'met' : 'NOT met'}${quick ? ' (quick: 7 days only)' : ''}.`);
}

async function solverSection(): Promise<void> {
  const sizes = quick ? [24, 48] : [24, 48, 96];
  const cap = quick ? 10 : 60;
  const section = `HiGHS (engine) vs GLPK (plain model), GLPK capped at ${cap} s`;
  for (const steps of sizes) {
    const spec = smallSite(steps);
    log(`solvers: ${steps} steps`);
    const engine = checked(spec, await solveSite(monolithic(spec, ALL_REDUCTIONS_ON, spec.solver.mipGap)));
    rows.push(engineRow(section, `HiGHS, ${steps} steps`, engine, ''));
    const plain = await solvePlain(spec, { mipGap: spec.solver.mipGap, timeLimitSeconds: cap });
    const same = plain.status === 'optimal' && sameWithin(plain.objective, engine.objective.value, 1e-5) ? 'same optimum' : plain.status === 'optimal' ? 'DIFFERENT optimum' : 'no proof within cap';
    rows.push({
      section,
      variant: `GLPK, ${steps} steps`,
      solveS: plain.seconds,
      objective: plain.status === 'optimal' || plain.status === 'feasible' ? plain.objective : null,
      note: `${plain.status}; ${same}; ${(plain.seconds / Math.max(1e-3, engine.model.solveSeconds)).toFixed(0)}× HiGHS's solve time`,
    });
  }
}

async function memorySection(): Promise<void> {
  const total = quick ? 300 : 5000;
  const every = quick ? 100 : 1000;
  // One worker for the whole run (no recycling), so growth of one WebAssembly instance shows.
  const pool = new SolverPool({ size: 1, solvesPerWorker: total + 1 });
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

function machine(): string[] {
  const cpu = /model name\s*:\s*(.+)/.exec(readFileSync('/proc/cpuinfo', 'utf8'))?.[1] ?? os.cpus()[0]?.model ?? 'unknown';
  const nproc = execFileSync('nproc', { encoding: 'utf8' }).trim();
  return [
    `- Date: ${new Date().toISOString()}`,
    `- Machine: ${cpu}, nproc ${nproc}, ${mb(os.totalmem())} RAM`,
    `- Node ${process.version}, ${quick ? 'quick run (`--quick`)' : 'full run'}`,
    // Other work on the machine slows every figure; the load average says how busy it was.
    `- Load average (1 min) at start ${loadAtStart.toFixed(1)}, at end ${os.loadavg()[0].toFixed(1)}`,
  ];
}

function table(): string {
  const head = '| Section | Variant | Binaries | Nonzeros | Build s | Solve s | Objective | Notes |\n|---|---|---:|---:|---:|---:|---:|---|';
  const body = rows.map((r) => `| ${r.section} | ${r.variant} | ${r.binaries ?? ''} | ${r.nonzeros ?? ''} | ${f2(r.buildS)} | ${f2(r.solveS)} | ${fObj(r.objective)} | ${r.note} |`);
  return [head, ...body].join('\n');
}

async function main(): Promise<void> {
  const started = performance.now();
  // Load the solver worker and warm it on models of the sizes measured below: V8 first runs
  // WebAssembly in its baseline tier and optimises the hot HiGHS code only once it has run a
  // while, so the first sizeable solve of a process took 3–6× longer than the same solve
  // repeated (measured on the reductions site). Without this the section measured first pays for it.
  await solveSite(smallSite(6));
  await solveSite(monolithic(cutSteps(solarWeekSite(), 2 * 96), ALL_REDUCTIONS_ON, 1e-4));
  await solveSite(monolithic(cutSteps(gridTiedSite(2, 15), 144), ALL_REDUCTIONS_OFF, 1e-3));
  await reductionsSection();
  await rollingSection();
  await solverSection();
  await memorySection();
  const seconds = (performance.now() - started) / 1000;
  const md = [
    '# Gridwright benchmark results',
    '',
    'Written by `npm run bench` (tests/bench/run.ts). Sites are invented and generated deterministically',
    '(tests/bench/sites.ts). Every engine schedule below passed the independent verifier. Times are the',
    "engine's reported build and solve seconds (HiGHS in a worker thread); GLPK times are its in-process",
    'solve of the plain formulation (tests/reference/support/plain-formulation.ts).',
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
  // A quick run is a sanity check: it prints, but never replaces the recorded full results.
  if (!quick) writeFileSync(path.join(import.meta.dirname, 'RESULTS.md'), md);
  log(`bench finished in ${seconds.toFixed(0)} s`);
  process.exit(0);
}

void main();
