import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ModelReport, ResultWarning, RunResult, SolveOutcome } from '@gridwright/shared/run-result';
import type { BigMEntry } from './build-window-model';
import { initialState } from './carry-state';
import { chooseSolveMode } from './choose-solve-mode';
import { coefficientRangeWarning, mergeRanges, type CoefficientRanges } from './coefficient-ranges';
import { Deadline } from './deadline';
import { VERIFY_RELATIVE_TOLERANCE } from './numerics';
import { objectiveTerms, sumTerms } from './evaluate-objective';
import { monolithicWindow, rollingSegments } from './horizon-windows';
import { siteFacts } from './plan-window';
import { precheckInfeasibility } from './precheck-infeasibility';
import { createScheduleBuffers, toSchedule } from './schedule-buffers';
import { scheduleKpis } from './schedule-kpis';
import { SolveBudget } from './solve-budget';
import { solveRolling, type HorizonSolve } from './solve-rolling';
import { BOUND_TIME_SHARE, horizonBound } from './horizon-bound';
import { relativeGap } from './solve-in-blocks';
import { endedWithoutSchedule, failedRecord, solveSequence, type SolveContext, type WindowRecord } from './solve-sequence';
import { specWarnings } from './spec-warnings';
import type { StoreValuation } from './terminal-values';
import type { SolverIdentity, SolverPort } from './solver-port';
import { verifySchedule } from './verify-schedule';

/** What the engine computes for a spec: a run's result without the run's status, which the caller decides. */
export type SiteSolution = Omit<RunResult, 'status'>;

export interface SolveOptions {
  /** Solves every model; the engine runs up to its `concurrency` solves at once. */
  solver: SolverPort;
  /** When the whole solve must end (deadline.ts); default: the spec's time limit, from when the solver is ready. */
  deadline?: Deadline;
  /** Abort ⇒ every solve in flight is stopped and solveSite rejects with SolveAbortedError. */
  signal?: AbortSignal;
  onProgress?: (p: { windowsDone: number; windowsTotal: number }) => void;
  /** The solver's log lines. */
  onLog?: (line: string) => void;
  /** How rolling windows value product left in a store; runs use the default 'value-curve' (terminal-values.ts). */
  storeValuation?: StoreValuation;
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

function emptyReport(mode: 'monolithic' | 'rolling', spec: ResolvedSiteSpec, solver: SolverIdentity): ModelReport {
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
    segments: 1,
    scale: { powerKw: 1, money: 1, stores: Object.fromEntries(spec.stores.map((s) => [s.id, 1])), demandPeakKw: 1 },
    buildSeconds: 0,
    solveSeconds: 0,
    horizonBound: null,
    solver: { name: solver.name, version: solver.version },
  };
}

function mergeBigM(into: Map<string, number>, list: BigMEntry[]): void {
  for (const e of list) into.set(e.where, Math.max(into.get(e.where) ?? 0, e.value));
}


/**
 * The solved windows into the report, in step order (a seam probe after the window it shares a
 * start with): counts and times summed, coefficient ranges and big-M values merged. Parallel
 * segments overlap in time, so the summed seconds measure effort and can exceed the wall time.
 */
function addWindows(spec: ResolvedSiteSpec, report: ModelReport, records: WindowRecord[]): void {
  const bigM = new Map<string, number>();
  let ranges: CoefficientRanges | null = null;
  const order = (r: WindowRecord) => (r.kind === 'window' ? 0 : 1);
  const sorted = records.slice().sort((a, b) => a.window.from - b.window.from || order(a) - order(b));
  for (const { kind, window, result: r } of sorted) {
    report.windows.push({
      kind,
      fromStep: window.from,
      toStep: window.from + window.steps - 1,
      committedSteps: kind === 'window' ? window.commit : 0,
      outcome: r.outcome,
      gap: r.gap,
      blocks: r.blocks,
      solveSeconds: r.solveSeconds,
    });
    report.variables += r.variables;
    report.binaries += r.binaries;
    report.binariesPruned += r.binariesBefore - r.binaries;
    report.constraints += r.constraints;
    report.nonzeros += r.nonzeros;
    report.buildSeconds += r.buildSeconds;
    report.solveSeconds += r.solveSeconds;
    report.scale = {
      powerKw: r.scale.powerKw,
      money: r.scale.money,
      stores: Object.fromEntries(spec.stores.map((s, j) => [s.id, r.scale.stores[j]])),
      demandPeakKw: r.scale.demandPeakKw,
    };
    ranges = mergeRanges(ranges, r.ranges);
    mergeBigM(bigM, r.bigM);
  }
  if (ranges) report.coefficientRange = ranges;
  report.bigM = [...bigM].map(([where, value]) => ({ where, value }));
}

/** The solved models whose coefficients left the healthy band, with the steps each covered. */
function offBandWindows(records: WindowRecord[]) {
  return records
    .filter((r) => Object.keys(r.result.rangesOutsideBand).length > 0)
    .map((r) => ({ outside: r.result.rangesOutsideBand, steps: { from: r.window.from, to: r.window.from + r.window.steps - 1 } }));
}

/**
 * What time limit a rolling run that ran out would need: at the pace of the windows that found a
 * schedule, the whole horizon, rounded up to a minute.
 */
function timeAdvice(spec: ResolvedSiteSpec, progress: { windowsWithSchedule: number; windowsPlanned: number }): string {
  const advice = 'a longer solver.timeLimitSeconds gives every window more time to find one.';
  if (progress.windowsWithSchedule === 0) return advice;
  const seconds = 60 * Math.ceil((spec.solver.timeLimitSeconds * progress.windowsPlanned) / progress.windowsWithSchedule / 60);
  return `at that pace the whole horizon needs about ${seconds} s, and ${advice}`;
}

/** `windowsWithSchedule` of `windowsPlanned` rolling windows had a schedule when the run failed (null: one model). */
function failureWarnings(
  spec: ResolvedSiteSpec,
  failed: WindowRecord,
  progress: { windowsWithSchedule: number; windowsPlanned: number } | null,
): ResultWarning[] {
  const { window, result } = failed;
  const steps = { from: window.from, to: window.from + window.steps - 1 };
  if (result.outcome === 'no-solution') {
    // A long rolling run stopped part-way: how far it got tells the user how much more time it needs.
    const howFar = progress
      ? ` ${progress.windowsWithSchedule} of ${progress.windowsPlanned} rolling windows had a schedule by then; ${timeAdvice(spec, progress)}`
      : '';
    return [
      {
        code: 'time-limit',
        message: `The time limit of ${spec.solver.timeLimitSeconds} s ran out before a feasible schedule was found for steps ${steps.from}–${steps.to}.${howFar}`,
        pointer: '/solver/timeLimitSeconds',
      },
    ];
  }
  const seam: ResultWarning[] =
    window.from > 0
      ? [
          {
            code: 'rolling-window-infeasible',
            message:
              `Rolling window at steps ${steps.from}–${steps.to} is infeasible from the state the earlier windows left ` +
              '(SOC, on/off and time in state). Try solver.mode "monolithic" or a longer solver.window.windowSteps.',
            pointer: '/solver/window',
            steps: [steps],
          },
        ]
      : [];
  return [
    ...seam,
    {
      code: 'infeasible',
      message:
        `No schedule satisfies the spec at steps ${steps.from}–${steps.to}; the solver proved it infeasible.` +
        (result.diagnosis.length ? ' The warnings that follow name the parts of the spec in the conflict it isolated.' : ''),
      steps: [steps],
    },
    ...result.diagnosis,
  ];
}

/**
 * Solves a site spec: pre-checks, then one model (monolithic) or windows (rolling), each
 * planned, built, checked for healthy coefficient ranges, solved through the solver port (split
 * into independent blocks where the model allows) and extracted into the stitched schedule,
 * which the independent verifier checks before anything is returned.
 *
 * Resolves with a SiteSolution for every solver outcome (infeasible and no-solution included).
 * Rejects with SolveAbortedError on abort, and with ScheduleVerificationError if the schedule
 * fails verification — that is an engine fault and must never be reported as a success.
 */
export async function solveSite(spec: ResolvedSiteSpec, opts: SolveOptions): Promise<SiteSolution> {
  const { solver } = opts;
  const startedMs = performance.now();
  const identity = await solver.describe();
  const deadline = opts.deadline ?? Deadline.after(spec.solver.timeLimitSeconds);
  const mode = chooseSolveMode(spec);
  const report = emptyReport(mode, spec, identity);
  const warnings = specWarnings(spec);
  const noSchedule = (outcome: SolveOutcome, extra: ResultWarning[]): SiteSolution => ({
    outcome,
    objective: { value: null, bound: null, gap: null },
    kpis: null,
    schedule: null,
    model: report,
    warnings: [...warnings, ...extra],
  });

  if (precheckInfeasibility(spec).length) return noSchedule('infeasible', []);

  const segments = mode === 'rolling' ? rollingSegments(spec) : null;
  const windowsPlanned = segments ? segments.reduce((n, s) => n + s.windows.length, 0) + segments.length - 1 : 1;
  const budget = new SolveBudget(deadline, windowsPlanned, segments ? Math.min(solver.concurrency, segments.length) : 1, opts.onProgress);
  const buffers = createScheduleBuffers(spec);
  const ctx: SolveContext = { spec, facts: siteFacts(spec, opts.storeValuation), buffers, solver, budget, signal: opts.signal, onLog: opts.onLog };
  let solved: HorizonSolve;
  if (segments) solved = await solveRolling(ctx, segments);
  else {
    const end = await solveSequence(ctx, monolithicWindow(spec), initialState(spec));
    solved = { records: end.records, failed: failedRecord(end), segments: 1 };
  }
  report.segments = solved.segments;
  addWindows(spec, report, solved.records);
  const numerics = coefficientRangeWarning(spec, offBandWindows(solved.records));
  if (numerics) warnings.push(numerics);
  if (solved.failed) {
    const progress = segments
      ? {
          windowsWithSchedule: solved.records.filter((r) => r.kind === 'window' && !endedWithoutSchedule(r.result)).length,
          windowsPlanned: segments.reduce((n, s) => n + s.windows.length, 0),
        }
      : null;
    return noSchedule(solved.failed.result.outcome, failureWarnings(spec, solved.failed, progress));
  }

  const schedule = toSchedule(spec, buffers);
  const check = verifySchedule(spec, schedule);
  if (!check.ok) throw new ScheduleVerificationError(check.violations);
  const terms = objectiveTerms(spec, ctx.facts.chargeSteps, buffers);
  const value = sumTerms(terms);
  // The verifier recomputes the objective from the schedule alone, term by term; the two must agree.
  if (Math.abs(check.objective - value) > VERIFY_RELATIVE_TOLERANCE * Math.max(1, Math.abs(value))) {
    throw new ScheduleVerificationError([
      { code: 'objective-mismatch', message: `the schedule's objective is ${value}; recomputed independently it is ${check.objective}` },
    ]);
  }
  // A schedule stitched from windows is feasible, never proved optimal for the whole horizon;
  // its bound comes from the decomposition of horizon-bound.ts, in the time the run has left.
  const whole = solved.records.length === 1 && solved.records[0].window.steps === spec.horizon.steps;
  const single = whole ? solved.records[0].result : null;
  let bound = single ? single.bound : null;
  let gap = single ? single.gap : null;
  if (!whole) {
    const scheduleSeconds = (performance.now() - startedMs) / 1000;
    const proven = await horizonBound({ spec, facts: ctx.facts, schedule: buffers, solver, deadline, signal: opts.signal }, BOUND_TIME_SHARE * scheduleSeconds);
    report.solveSeconds += proven.solveSeconds;
    // Below the schedule's own objective the bound cannot be right: it is withheld, never shown.
    const reason = proven.value === null ? proven.reason : proven.value < value ? `the bound came out ${proven.value}, below the schedule's objective` : null;
    if (reason === null) {
      bound = proven.value;
      gap = relativeGap(value, proven.value!);
    }
    report.horizonBound = { blocks: proven.blocks, solveSeconds: proven.solveSeconds, bound, gap, reason };
    if (reason !== null) {
      warnings.push({ code: 'bound-unavailable', message: `No bound on the whole horizon: ${reason}.` });
    }
  }
  return {
    outcome: single?.outcome === 'optimal' ? 'optimal' : 'feasible',
    objective: { value, bound, gap },
    kpis: scheduleKpis(spec, ctx.facts.chargeSteps, buffers, terms),
    schedule,
    model: report,
    warnings,
  };
}
