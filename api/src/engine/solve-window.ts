import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ResultWarning, SolveOutcome } from '@gridwright/shared/run-result';
import { buildWindowModel, type BigMEntry, type BuiltModel } from './build-window-model';
import type { Scales } from './choose-scales';
import { coefficientRanges, rangesOutsideBand, type CoefficientRanges } from './coefficient-ranges';
import type { Deadline } from './deadline';
import { diagnoseInfeasibleSubsystem } from './diagnose-infeasible-subsystem';
import { extractWindowSchedule } from './extract-window-schedule';
import { planWindow, type ForcedBinaries, type HorizonWindow, type SiteFacts, type WindowStartState } from './plan-window';
import { repairExclusivity } from './repair-exclusivity';
import type { ScheduleBuffers } from './schedule-buffers';
import { priceWindow } from './price-window';
import { solveInBlocks } from './solve-in-blocks';
import type { SolverPort } from './solver-port';

/** Re-solves with the exclusivity binaries a relaxed solution could not do without; the last round keeps them all. */
const EXCLUSIVITY_ROUNDS = 3;
/** An infeasible subsystem is only sought on models this small; on larger ones it can outlast the time limit. */
const IIS_MAX_COLUMNS = 5_000;

export interface WindowSolve {
  outcome: SolveOutcome;
  gap: number | null;
  bound: number | null;
  blocks: number;
  /** Solver time, blocks summed; time spent waiting for a free solver thread is not counted. */
  solveSeconds: number;
  buildSeconds: number;
  variables: number;
  binaries: number;
  binariesBefore: number;
  constraints: number;
  nonzeros: number;
  ranges: CoefficientRanges;
  /** The kinds of coefficient that left the healthy band (numerics.ts), checked before the solve. */
  rangesOutsideBand: Partial<CoefficientRanges>;
  bigM: BigMEntry[];
  scale: Scales;
  diagnosis: ResultWarning[];
}

export interface WindowSolveOptions {
  solver: SolverPort;
  /**
   * `buffers` holds a committed schedule from this step up to the window: the solve starts from
   * yesterday's commitment (yesterdaysCommitment) where that reaches a day back. Absent: no guess.
   */
  guessFrom?: number;
  /** The window's share of the run's time: its blocks and re-solves all end by it. */
  deadline: Deadline;
  /** Where given, the window's solves stop here once they hold a feasible schedule (SolveRequest). */
  stopWithSolutionBy?: Deadline;
  signal?: AbortSignal;
  onLog?: (line: string) => void;
}

const now = () => performance.now() / 1000;

/**
 * Plans, builds and solves one window, then copies its committed steps into `buffers` and
 * removes simultaneous charge/discharge or import/export that a relaxed model let through
 * (re-solving with those binaries where the schedule cannot simply be rewritten).
 */
export async function solveWindow(
  spec: ResolvedSiteSpec,
  facts: SiteFacts,
  window: HorizonWindow,
  start: WindowStartState,
  buffers: ScheduleBuffers,
  opts: WindowSolveOptions,
): Promise<WindowSolve> {
  const forced: ForcedBinaries = { storage: spec.storage.map(() => new Set<number>()), grid: new Set<number>() };
  let buildSeconds = 0;
  let solveSeconds = 0;
  for (let round = 0; ; round++) {
    if (round === EXCLUSIVITY_ROUNDS - 1) {
      for (let k = 0; k < window.steps; k++) {
        forced.grid.add(k);
        for (const s of forced.storage) s.add(k);
      }
    }
    const t0 = now();
    const plan = planWindow(spec, facts, window, start, forced);
    const built = buildWindowModel(plan);
    buildSeconds += now() - t0;
    const ranges = coefficientRanges(built.model);
    const mipStart = round === 0 && opts.guessFrom !== undefined ? yesterdaysCommitment(spec, window, built, buffers, opts.guessFrom) : undefined;
    const outside = rangesOutsideBand(ranges);
    const res = await solveInBlocks(
      opts.solver,
      built.model,
      {
        deadline: opts.deadline,
        stopWithSolutionBy: opts.stopWithSolutionBy,
        mipGap: spec.solver.mipGap,
        mipStart,
        wantIis: built.model.numCols <= IIS_MAX_COLUMNS,
        signal: opts.signal,
        onLog: opts.onLog,
      },
      spec.solver.reductions.independentBlocks,
    );
    solveSeconds += res.workerSeconds;
    const base = {
      blocks: res.blocks,
      solveSeconds,
      buildSeconds,
      variables: built.model.numCols,
      binaries: built.binaries,
      binariesBefore: plan.binariesBefore,
      constraints: built.model.numRows,
      nonzeros: built.model.values.length,
      ranges,
      rangesOutsideBand: outside,
      bigM: built.bigM,
      scale: plan.scales,
    };
    if (!res.colValue) {
      if (res.status === 'infeasible') {
        const diagnosis = res.iis && (res.iis.rows.length || res.iis.cols.length) ? diagnoseInfeasibleSubsystem(spec, window, built.tags, res.iis) : [];
        return { ...base, outcome: 'infeasible', gap: null, bound: null, diagnosis };
      }
      if (res.status === 'time-limit') return { ...base, outcome: 'no-solution', gap: null, bound: null, diagnosis: [] };
      throw new Error(`The solver ended with status ${res.status} (${res.solverStatus}) on steps ${window.from}–${window.from + window.steps - 1}`);
    }
    extractWindowSchedule(plan, built, res.colValue, buffers);
    const left = repairExclusivity(spec, buffers, window.from, window.from + window.commit);
    const unrepaired = left.grid.length + left.storage.reduce((n, s) => n + s.length, 0);
    if (unrepaired === 0 || round === EXCLUSIVITY_ROUNDS - 1) {
      const proved = res.status === 'optimal' && !res.killedAtDeadline;
      const priced = await priceWindow(opts.solver, plan, built, res.colValue, buffers, { deadline: opts.deadline, signal: opts.signal });
      return {
        ...base,
        solveSeconds: solveSeconds + priced.workerSeconds,
        outcome: proved ? 'optimal' : 'feasible',
        gap: res.mipGap,
        bound: res.dualBound === null ? null : (res.dualBound + built.objectiveOffset) * plan.scales.money,
        diagnosis: [],
      };
    }
    for (const t of left.grid) forced.grid.add(t - window.from);
    left.storage.forEach((steps, i) => steps.forEach((t) => forced.storage[i].add(t - window.from)));
  }
}

/**
 * A first guess for a window a day or more into its sequence: every unit on or off as it was at the
 * same time of day on the last committed day. Sites that follow the sun and the daily load repeat
 * much of yesterday; the solver checks the guess and drops it if it breaks a rule here. Only the
 * on/off columns are given: the solver completes the rest.
 */
function yesterdaysCommitment(spec: ResolvedSiteSpec, window: HorizonWindow, built: BuiltModel, buffers: ScheduleBuffers, committedFrom: number): Float64Array | undefined {
  const day = Math.round(1440 / spec.horizon.stepMinutes);
  const yesterday = window.from - day;
  if (yesterday < committedFrom || !built.binaries || !spec.units.length) return undefined;
  const guess = new Float64Array(built.model.numCols).fill(NaN);
  built.columns.units.forEach((cols, i) => {
    for (let k = 0; k < window.steps; k++) if (cols.on[k] >= 0) guess[cols.on[k]] = buffers.units[i].on[yesterday + (k % day)];
  });
  return guess;
}
