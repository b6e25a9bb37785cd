// The bench's horizon-bound section: the proven bound a rolling solve reports on the whole horizon
// (api/src/engine/horizon-bound.ts) — what it costs on the 15-minute year and how close it comes,
// against the monolithic optimum and its own dual bound where one model can still be solved.
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { solveSite, type SiteSolution } from '../../api/src/engine/solve-site';
import type { SolverPort } from '../../api/src/engine/solver-port';
import { verifySchedule } from '../../api/src/engine/verify-schedule';
import { gridTiedSite } from './sites';

export interface SectionRow {
  variant: string;
  binaries?: number;
  nonzeros?: number;
  buildS?: number;
  solveS?: number;
  wallS?: number;
  objective?: number | null;
  note: string;
}

export interface BenchSection {
  section: string;
  rows: SectionRow[];
  summary: string[];
}

export interface SectionOptions {
  solver: SolverPort;
  quick: boolean;
  log: (line: string) => void;
}

const pct = (x: number | null | undefined) => (x === null || x === undefined ? '—' : `${(100 * x).toFixed(3)} %`);

/** Solves, checks the schedule with the independent verifier, and measures the wall time to the verified result. */
export async function timedSolve(spec: ResolvedSiteSpec, solver: SolverPort): Promise<{ r: SiteSolution; seconds: number }> {
  const started = performance.now();
  const r = await solveSite(spec, { solver });
  const seconds = (performance.now() - started) / 1000;
  if (r.schedule) {
    const v = verifySchedule(spec, r.schedule);
    if (!v.ok) throw new Error(`bench schedule failed verification: ${v.violations[0].message}`);
  }
  return { r, seconds };
}

export function resultRow(variant: string, r: SiteSolution, wallS: number, note: string): SectionRow {
  return {
    variant,
    binaries: r.model.binaries,
    nonzeros: r.model.nonzeros,
    buildS: r.model.buildSeconds,
    solveS: r.model.solveSeconds,
    wallS,
    objective: r.objective.value,
    note: `${r.outcome}${note ? `; ${note}` : ''}`,
  };
}

function boundNote(r: SiteSolution): string {
  const hb = r.model.horizonBound;
  if (!hb) return 'no horizon bound';
  if (hb.reason) return `bound null: ${hb.reason}`;
  return `bound ${r.objective.bound!.toFixed(2)}, gap ${pct(r.objective.gap)}; ${hb.blocks} blocks, ${hb.solveSeconds.toFixed(2)} s solver time summed`;
}

export async function rollingBoundSection({ solver, quick, log }: SectionOptions): Promise<BenchSection> {
  const rows: SectionRow[] = [];
  const summary: string[] = [];

  // Where the monolithic optimum is still within reach, the bound is compared with it and with
  // the monolithic solve's own dual bound.
  const weekDays = quick ? 3 : 7;
  const week = gridTiedSite(weekDays, 15);
  log(`horizon bound: ${weekDays} d monolithic`);
  const mono = await timedSolve({ ...week, solver: { ...week.solver, mode: 'monolithic', mipGap: 1e-4, timeLimitSeconds: 900 } }, solver);
  log(`horizon bound: ${weekDays} d rolling`);
  const rolled = await timedSolve({ ...week, solver: { ...week.solver, mode: 'rolling', timeLimitSeconds: 900 } }, solver);
  const optimum = mono.r.objective.value!;
  const bound = rolled.r.objective.bound;
  rows.push(resultRow(`${weekDays} d × 15 min, monolithic (gap 1e-4)`, mono.r, mono.seconds, `dual bound ${mono.r.objective.bound?.toFixed(2)}`));
  rows.push(resultRow(`${weekDays} d × 15 min, rolling`, rolled.r, rolled.seconds, `${boundNote(rolled.r)}; bound above the monolithic optimum by ${bound === null ? '—' : pct((bound - optimum) / Math.abs(optimum))}`));
  summary.push(
    `Horizon bound, ${weekDays} d × 15 min: rolling ${rolled.r.objective.value!.toFixed(2)}, monolithic optimum ${optimum.toFixed(2)}, ` +
      `bound ${bound?.toFixed(2) ?? 'null'} (proven gap ${pct(rolled.r.objective.gap)}; bound − optimum ${bound === null ? '—' : pct((bound - optimum) / Math.abs(optimum))}).`,
  );

  const yearDays = quick ? 14 : 365;
  const year = gridTiedSite(yearDays, 15);
  log(`horizon bound: ${year.horizon.steps} steps rolling`);
  const yr = await timedSolve({ ...year, solver: { ...year.solver, mode: 'rolling', timeLimitSeconds: 900 } }, solver);
  rows.push(resultRow(`${yearDays} d × 15 min (${year.horizon.steps} steps), rolling with its bound`, yr.r, yr.seconds, `${boundNote(yr.r)}; wall incl. bound and verification; target ≤ 60 s`));
  const met = yr.r.objective.bound !== null && yr.seconds <= 60;
  summary.push(
    `Horizon bound, ${year.horizon.steps} steps: ${f(yr.seconds)} s wall including the bound (${yr.r.model.horizonBound?.blocks ?? 0} blocks, ` +
      `${f(yr.r.model.horizonBound?.solveSeconds ?? 0)} s solver time summed), proven gap ${pct(yr.r.objective.gap)} — target ≤ 60 s ${met ? 'met' : 'NOT met'}` +
      `${quick ? ' (quick: 14 days only)' : ''}.`,
  );
  return { section: 'Horizon bound of rolling solves: grid-tied + battery', rows, summary };
}

const f = (x: number) => x.toFixed(2);
