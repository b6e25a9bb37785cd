// The bench's engine-vs-CBC sections: the engine on a warm solver pool (the path a run worker takes:
// `solveSite` on the worker's HiGHS pool, schedule verified) against Debian's CBC 2.10 on the
// independent plain formulation of the same spec (tests/reference/support/plain-formulation.ts),
// as CPLEX-LP text on the command line with the spec's MIP gap as `ratioGap`, `preprocess off`
// (PLATFORM.md) and one and two threads. CBC's time is its process from start to its answer read
// back; writing the text is not counted. Every CBC answer is checked against the plain model and
// must reach the engine's optimum within the gap, or the figure is void.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { solveSite, type SiteSolution } from '../../api/src/engine/solve-site';
import type { SolverPort } from '../../api/src/engine/solver-port';
import { verifySchedule } from '../../api/src/engine/verify-schedule';
import { buildPlainModel } from '../reference/support/plain-formulation';
import { solveLpText } from '../reference/support/plain-lp-text';
import { resolveSpec } from '../reference/support/specs';
import { dayAheadSites } from './day-ahead-sites';

export interface EngineVsCbcRow {
  variant: string;
  wallS?: number;
  objective?: number | null;
  note: string;
}

interface Options {
  quick: boolean;
  log: (line: string) => void;
  /** The bench's warm pool, shared with the other sections as a worker's runs share it. */
  solver: SolverPort;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
const f2 = (x: number) => x.toFixed(2);
/** A solve that took longer than this is not repeated: one run of a slow model moves little between runs. */
const REPEAT_BELOW_SECONDS = 5;

/** A median time and how many runs it is the median of. */
interface Timing {
  seconds: number;
  runs: number;
}

async function engineSeconds(spec: ResolvedSiteSpec, solver: SolverPort, repeats: number): Promise<Timing & { result: SiteSolution }> {
  const times: number[] = [];
  let result: SiteSolution | null = null;
  for (let i = 0; i < repeats; i++) {
    const started = performance.now();
    result = await solveSite(spec, { solver });
    const v = result.schedule ? verifySchedule(spec, result.schedule) : null;
    times.push((performance.now() - started) / 1000);
    if (!v?.ok) throw new Error(`engine schedule of ${spec.name} ${v ? `failed verification: ${v.violations[0].message}` : 'missing'}`);
    if (times[0] > REPEAT_BELOW_SECONDS) break;
  }
  return { seconds: median(times), runs: times.length, result: result! };
}

async function cbcSeconds(spec: ResolvedSiteSpec, engineObjective: number, threads: number, repeats: number, dir: string): Promise<Timing> {
  const model = await buildPlainModel(spec);
  const times: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const answer = await solveLpText(model, 'cbc', { dir, name: `cbc-${threads}`, threads, ratioGap: spec.solver.mipGap });
    if (answer.status !== 'optimal' || answer.violations.length) throw new Error(`CBC on ${spec.name}: ${answer.status} ${answer.violations[0] ?? ''}`);
    // Both proved within the gap of the optimum, so they are within about twice the gap of each other.
    if (Math.abs(answer.objective - engineObjective) > 2 * spec.solver.mipGap * Math.max(1, Math.abs(engineObjective))) {
      throw new Error(`CBC's optimum ${answer.objective} of ${spec.name} is not the engine's ${engineObjective}`);
    }
    times.push(answer.seconds);
    if (times[0] > REPEAT_BELOW_SECONDS) break;
  }
  return { seconds: median(times), runs: times.length };
}

interface Pair {
  name: string;
  engine: Timing;
  cbc1: Timing | null;
  cbc2: Timing;
  result: SiteSolution;
}

/** The engine and CBC on each spec, one after the other (each keeps a core busy); CBC one-thread is skipped where `oneThread` is false. */
async function compare(specs: { name: string; spec: ResolvedSiteSpec; oneThread: boolean }[], opts: Options, repeats: { engine: number; cbc: number }): Promise<Pair[]> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'gridwright-bench-cbc-'));
  try {
    const pairs: Pair[] = [];
    for (const { name, spec, oneThread } of specs) {
      opts.log(`engine vs CBC: ${name}`);
      // Warm: the pool has solved this model before, as a worker has solved sites like it.
      await solveSite(spec, { solver: opts.solver });
      const { result, ...engine } = await engineSeconds(spec, opts.solver, repeats.engine);
      const value = result.objective.value!;
      const cbc1 = oneThread ? await cbcSeconds(spec, value, 1, repeats.cbc, dir) : null;
      const cbc2 = await cbcSeconds(spec, value, 2, repeats.cbc, dir);
      pairs.push({ name, engine, cbc1, cbc2, result });
    }
    return pairs;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const bestCbc = (p: Pair) => Math.min(p.cbc2.seconds, p.cbc1?.seconds ?? Infinity);
const ratio = (p: Pair) => p.engine.seconds / bestCbc(p);

function pairRows(pairs: Pair[]): EngineVsCbcRow[] {
  return pairs.flatMap((p) => [
    { variant: `${p.name}: engine, warm pool`, wallS: p.engine.seconds, objective: p.result.objective.value, note: `${p.result.outcome}; median of ${p.engine.runs}; ${f2(ratio(p))}× the faster CBC` },
    ...(p.cbc1 === null ? [] : [{ variant: `${p.name}: CBC, 1 thread`, wallS: p.cbc1.seconds, note: `median of ${p.cbc1.runs}; same optimum` }]),
    { variant: `${p.name}: CBC, 2 threads`, wallS: p.cbc2.seconds, note: `median of ${p.cbc2.runs}; same optimum` },
  ]);
}

/** Five invented day-ahead sites: the warm engine's time against the faster of CBC on one and on two threads. */
export async function dayAheadSection(opts: Options): Promise<{ rows: EngineVsCbcRow[]; summary: string[] }> {
  const repeats = opts.quick ? { engine: 1, cbc: 1 } : { engine: 5, cbc: 3 };
  const pairs = await compare(dayAheadSites().map((s) => ({ ...s, oneThread: true })), opts, repeats);
  const engineTotal = pairs.reduce((s, p) => s + p.engine.seconds, 0);
  const cbcTotal = pairs.reduce((s, p) => s + bestCbc(p), 0);
  const ratios = pairs.map(ratio);
  const worst = Math.max(...ratios);
  const total = engineTotal / cbcTotal;
  const rows = pairRows(pairs);
  rows.push({ variant: 'all five: engine / faster CBC', note: `total ${f2(engineTotal)} s vs ${f2(cbcTotal)} s = ${f2(total)}×; per site ${ratios.map(f2).join(', ')}× (target ≤ 0.5×)` });
  return {
    rows,
    summary: [
      `Day-ahead (five sites): warm engine ${f2(total)}× the faster CBC's total time (${f2(engineTotal)} s vs ${f2(cbcTotal)} s), per site ${ratios.map(f2).join(', ')}×, worst ${f2(worst)}× — target ≤ 0.5× ${total <= 0.5 ? 'met in total' : 'NOT met in total'}, ${worst <= 0.5 ? 'met' : 'NOT met'} on every site.`,
    ],
  };
}

/** The demo sites and the 10-unit system: the engine against CBC (two threads; one thread too on the demo sites). */
export async function demoSitesSection(opts: Options): Promise<{ rows: EngineVsCbcRow[]; summary: string[] }> {
  const repeats = opts.quick ? { engine: 1, cbc: 1 } : { engine: 3, cbc: 3 };
  const examples = path.resolve(import.meta.dirname, '../../shared/examples');
  const demo = ['grid-electrolyser', 'island-microgrid', 'solar-pump-station', 'warehouse-demand-charge'].map((name) => ({
    name: `demo ${name}`,
    spec: resolveSpec(JSON.parse(readFileSync(path.join(examples, `${name}.json`), 'utf8'))),
    oneThread: true,
  }));
  const tenUnit = {
    name: '10-unit system (24 h, gap 1e-5)',
    spec: resolveSpec(JSON.parse(readFileSync(path.resolve(import.meta.dirname, '../reference/ten-unit-system.json'), 'utf8'))),
    // One thread did not finish in 60 s (PLATFORM.md); two threads took 25–45 s.
    oneThread: false,
  };
  const pairs = [...(await compare(demo, opts, repeats)), ...(opts.quick ? [] : await compare([tenUnit], opts, { engine: 1, cbc: 1 }))];
  const rows = pairRows(pairs);
  const verdicts = pairs.map((p) => `${p.name} ${f2(ratio(p))}×`);
  const slower = pairs.filter((p) => ratio(p) > 1).map((p) => p.name);
  return {
    rows,
    summary: [`Demo sites and 10-unit system, engine / faster CBC: ${verdicts.join('; ')} — target ≤ 1× ${slower.length ? `NOT met on ${slower.join(', ')}` : 'met on every one'}.`],
  };
}
