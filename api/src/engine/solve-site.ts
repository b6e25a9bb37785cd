import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ModelReport, ResultWarning, RunResult, SolveOutcome, WindowReport } from '@gridwright/shared/run-result';
import { buildWindowModel, type BigMEntry } from './build-window-model';
import { initialState, stateAfter } from './carry-state';
import { chooseSolveMode } from './choose-solve-mode';
import { coefficientRanges, mergeRanges, type CoefficientRanges } from './coefficient-ranges';
import { diagnoseInfeasibleSubsystem } from './diagnose-infeasible-subsystem';
import { evaluateObjective } from './evaluate-objective';
import { extractWindowSchedule } from './extract-window-schedule';
import { monolithicWindow, rollingWindows } from './horizon-windows';
import { planWindow, type ForcedBinaries, type HorizonWindow, type WindowStartState } from './plan-window';
import { precheckInfeasibility } from './precheck-infeasibility';
import { repairExclusivity } from './repair-exclusivity';
import { createScheduleBuffers, toSchedule, type ScheduleBuffers } from './schedule-buffers';
import { scheduleKpis } from './schedule-kpis';
import { defaultSolverPool, SolveAbortedError, type SolverPool } from './solver-pool';
import { specWarnings } from './spec-warnings';
import { verifySchedule } from './verify-schedule';

export { SolveAbortedError } from './solver-pool';

export interface SolveOptions {
  /** Abort ⇒ the solver worker thread is terminated and solveSite rejects with SolveAbortedError. */
  signal?: AbortSignal;
  onProgress?: (p: { windowsDone: number; windowsTotal: number }) => void;
  /** HiGHS log lines. */
  onLog?: (line: string) => void;
  /** Reuse worker threads across calls; default: a module-level pool. */
  solver?: SolverPool;
}

/** The engine produced a schedule that its independent verifier rejects: an engine bug, never a result. */
export class ScheduleVerificationError extends Error {
  readonly violations: { code: string; message: string; step?: number; pointer?: string }[];
  constructor(violations: ScheduleVerificationError['violations']) {
    const head = violations
      .slice(0, 3)
      .map((v) => `${v.code}${v.step !== undefined ? ` at step ${v.step}` : ''}: ${v.message}`)
      .join('; ');
    super(`The computed schedule failed verification (${violations.length} violation(s)): ${head}`);
    this.name = 'ScheduleVerificationError';
    this.violations = violations;
  }
}

/** Re-solves with the exclusivity binaries a relaxed solution could not do without; the last round keeps them all. */
const EXCLUSIVITY_ROUNDS = 3;
/** An infeasible subsystem is only sought on models this small; on larger ones it can outlast the time limit. */
const IIS_MAX_COLUMNS = 5_000;

interface WindowSolve {
  outcome: SolveOutcome;
  gap: number | null;
  bound: number | null;
  solveSeconds: number;
  buildSeconds: number;
  variables: number;
  binaries: number;
  binariesBefore: number;
  constraints: number;
  nonzeros: number;
  ranges: CoefficientRanges;
  bigM: BigMEntry[];
  scale: { powerKw: number; money: number };
  diagnosis: ResultWarning[];
}

const now = () => performance.now() / 1000;

async function solveWindow(
  spec: ResolvedSiteSpec,
  window: HorizonWindow,
  start: WindowStartState,
  buffers: ScheduleBuffers,
  pool: SolverPool,
  timeLimitSeconds: number,
  opts: SolveOptions,
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
    const plan = planWindow(spec, window, start, forced);
    const built = buildWindowModel(plan);
    const t1 = now();
    buildSeconds += t1 - t0;
    const res = await pool.solve({
      model: built.model,
      timeLimitSeconds,
      mipGap: spec.solver.mipGap,
      wantIis: built.model.numCols <= IIS_MAX_COLUMNS,
      signal: opts.signal,
      onLog: opts.onLog,
    });
    solveSeconds += now() - t1;
    const base = {
      solveSeconds,
      buildSeconds,
      variables: built.model.numCols,
      binaries: built.binaries,
      binariesBefore: plan.binariesBefore,
      constraints: built.model.numRows,
      nonzeros: built.model.values.length,
      ranges: coefficientRanges(built.model),
      bigM: built.bigM,
      scale: plan.scales,
    };
    if (!res.colValue) {
      if (res.status === 'infeasible') {
        const diagnosis = res.iis && (res.iis.rows.length || res.iis.cols.length) ? diagnoseInfeasibleSubsystem(spec, window, built.tags, res.iis) : [];
        return { ...base, outcome: 'infeasible', gap: null, bound: null, diagnosis };
      }
      if (res.status === 'time-limit') return { ...base, outcome: 'no-solution', gap: null, bound: null, diagnosis: [] };
      throw new Error(`HiGHS ended with status ${res.status} (model status ${res.modelStatus}) on steps ${window.from}–${window.from + window.steps - 1}`);
    }
    extractWindowSchedule(plan, built, res.colValue, buffers);
    const left = repairExclusivity(spec, buffers, window.from, window.from + window.commit);
    const unrepaired = left.grid.length + left.storage.reduce((n, s) => n + s.length, 0);
    if (unrepaired === 0 || round === EXCLUSIVITY_ROUNDS - 1) {
      const proved = res.status === 'optimal' && !res.killedAtDeadline;
      return {
        ...base,
        outcome: proved ? 'optimal' : 'feasible',
        gap: res.mipGap,
        bound: res.dualBound === null ? null : res.dualBound * plan.scales.money,
        diagnosis: [],
      };
    }
    for (const t of left.grid) forced.grid.add(t - window.from);
    left.storage.forEach((steps, i) => steps.forEach((t) => forced.storage[i].add(t - window.from)));
  }
}

function emptyReport(mode: 'monolithic' | 'rolling', spec: ResolvedSiteSpec, version: string): ModelReport {
  return {
    mode,
    windows: [],
    variables: 0,
    binaries: 0,
    binariesPruned: 0,
    constraints: 0,
    nonzeros: 0,
    coefficientRange: { matrix: null, objective: null, bounds: null, rhs: null },
    bigM: [],
    reductions: { ...spec.solver.reductions },
    scale: { powerKw: 1, money: 1 },
    buildSeconds: 0,
    solveSeconds: 0,
    solver: { name: 'HiGHS', version },
  };
}

function mergeBigM(into: Map<string, number>, list: BigMEntry[]): void {
  for (const e of list) into.set(e.where, Math.max(into.get(e.where) ?? 0, e.value));
}

/**
 * Solves a site spec: pre-checks, then one model (monolithic) or a sequence of windows
 * (rolling), each planned, built, solved by HiGHS in a worker thread and extracted into the
 * stitched schedule, which the independent verifier checks before anything is returned.
 *
 * Resolves with a RunResult for every solver outcome (infeasible and no-solution included).
 * Rejects with SolveAbortedError on abort, and with ScheduleVerificationError if the schedule
 * fails verification — that is an engine fault and must never be reported as a success.
 */
export async function solveSite(spec: ResolvedSiteSpec, opts: SolveOptions = {}): Promise<RunResult> {
  const pool = opts.solver ?? defaultSolverPool();
  const version = await pool.version();
  const mode = chooseSolveMode(spec);
  const report = emptyReport(mode, spec, version);
  const warnings = specWarnings(spec);
  const noSchedule = (outcome: SolveOutcome, extra: ResultWarning[]): RunResult => ({
    status: 'succeeded',
    outcome,
    objective: { value: null, bound: null, gap: null },
    kpis: null,
    schedule: null,
    model: report,
    warnings: [...warnings, ...extra],
  });

  if (precheckInfeasibility(spec).length) return noSchedule('infeasible', []);

  const windows = mode === 'rolling' ? rollingWindows(spec) : monolithicWindow(spec);
  const buffers = createScheduleBuffers(spec);
  const deadline = now() + spec.solver.timeLimitSeconds;
  const bigM = new Map<string, number>();
  let ranges: CoefficientRanges | null = null;
  let state = initialState(spec);
  let anyUnproved = windows.length > 1;
  let last: WindowSolve | null = null;

  for (let w = 0; w < windows.length; w++) {
    if (opts.signal?.aborted) throw new SolveAbortedError();
    const window = windows[w];
    const remaining = deadline - now();
    const windowsLeft = windows.length - w;
    // Each window may use up to three times its fair share of what is left, so one hard window
    // can take longer without starving the rest.
    const limit = Math.max(0.2, Math.min(remaining, (3 * remaining) / windowsLeft));
    const r = await solveWindow(spec, window, state, buffers, pool, limit, opts);
    last = r;
    const windowReport: WindowReport = {
      fromStep: window.from,
      toStep: window.from + window.steps - 1,
      committedSteps: window.commit,
      outcome: r.outcome,
      gap: r.gap,
      solveSeconds: r.solveSeconds,
    };
    report.windows.push(windowReport);
    report.variables += r.variables;
    report.binaries += r.binaries;
    report.binariesPruned += r.binariesBefore - r.binaries;
    report.constraints += r.constraints;
    report.nonzeros += r.nonzeros;
    report.buildSeconds += r.buildSeconds;
    report.solveSeconds += r.solveSeconds;
    report.scale = r.scale;
    ranges = mergeRanges(ranges, r.ranges);
    report.coefficientRange = ranges;
    mergeBigM(bigM, r.bigM);
    report.bigM = [...bigM].map(([where, value]) => ({ where, value }));

    if (r.outcome === 'infeasible') {
      const seam: ResultWarning[] =
        window.from > 0
          ? [
              {
                code: 'rolling-window-infeasible',
                message:
                  `Rolling window at steps ${window.from}–${window.from + window.steps - 1} is infeasible from the state the earlier windows left ` +
                  '(SOC, on/off and time in state). Try solver.mode "monolithic" or a longer solver.window.windowSteps.',
                pointer: '/solver/window',
                steps: [{ from: window.from, to: window.from + window.steps - 1 }],
              },
            ]
          : [];
      const diagnosis: ResultWarning[] = [
        {
          code: 'infeasible',
          message:
            `No schedule satisfies the spec at steps ${window.from}–${window.from + window.steps - 1}; the solver proved it infeasible.` +
            (r.diagnosis.length ? ' The warnings that follow name the parts of the spec in the conflict it isolated.' : ''),
          steps: [{ from: window.from, to: window.from + window.steps - 1 }],
        },
        ...r.diagnosis,
      ];
      return noSchedule('infeasible', [...seam, ...diagnosis]);
    }
    if (r.outcome === 'no-solution') {
      return noSchedule('no-solution', [
        {
          code: 'time-limit',
          message: `The time limit of ${spec.solver.timeLimitSeconds} s ran out before a feasible schedule was found for steps ${window.from}–${window.from + window.steps - 1}.`,
          pointer: '/solver/timeLimitSeconds',
        },
      ]);
    }
    if (r.outcome !== 'optimal') anyUnproved = true;
    state = stateAfter(spec, buffers, window.from + window.commit - 1);
    opts.onProgress?.({ windowsDone: w + 1, windowsTotal: windows.length });
  }

  const schedule = toSchedule(spec, buffers);
  const check = verifySchedule(spec, schedule);
  if (!check.ok) throw new ScheduleVerificationError(check.violations);
  const value = evaluateObjective(spec, buffers);
  const single = windows.length === 1 && last !== null;
  return {
    status: 'succeeded',
    // A rolling schedule is feasible, never proved optimal for the whole horizon.
    outcome: anyUnproved ? 'feasible' : 'optimal',
    objective: {
      value,
      bound: single ? last!.bound : null,
      gap: single ? last!.gap : null,
    },
    kpis: scheduleKpis(spec, buffers),
    schedule,
    model: report,
    warnings,
  };
}
