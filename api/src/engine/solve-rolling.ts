import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { advanceState, initialState, memoryOf, sameState } from './carry-state';
import { windowsBetween, type RollingSegment } from './horizon-windows';
import type { HorizonWindow, WindowEndState, WindowStartState } from './plan-window';
import { createScheduleBuffers } from './schedule-buffers';
import { endedWithoutSchedule, failedRecord, solveBudgetedWindow, solveSequence, type SequenceEnd, type SolveContext, type WindowRecord } from './solve-sequence';
import { SEAM_SOC_TOLERANCE } from './numerics';
import { SolveAbortedError } from './solver-port';

export interface HorizonSolve {
  /** The windows that made the schedule, in step order, then the seam probes. */
  records: WindowRecord[];
  /** The window that came out infeasible or without a solution; then there is no schedule. */
  failed: WindowRecord | null;
  segments: number;
}

/** Where a parallel segment starts, and the same state as an end its predecessor must reach. */
interface Seam {
  start: WindowStartState;
  end: WindowEndState;
}


/**
 * The state at step `b` is chosen before the windows that lead there are solved: a probe
 * window solved from one commit before `b`, starting from the spec's initial SOC with every
 * unit off for long, ends in a state a rolling solve plausibly reaches. Its SOC and the units'
 * last on/off values become the end its predecessor segment must reach and the start of the
 * segment at `b`. Null when the probe finds no schedule: then the segments meet the slow way.
 */
async function probeSeam(ctx: SolveContext, b: number, probes: WindowRecord[]): Promise<Seam | null> {
  const { spec } = ctx;
  const { windowSteps, commitSteps } = spec.solver.window;
  const T = spec.horizon.steps;
  const from = Math.max(0, b - commitSteps);
  const steps = Math.min(windowSteps, T - from);
  const window: HorizonWindow = { from, steps, commit: b - from, isFinal: from + steps >= T };
  const guess: WindowStartState = {
    units: spec.units.map((u) => ({ on: false, stepsInState: memoryOf(u), powerKw: null })),
    socKwh: spec.storage.map((s) => s.initialSocKwh),
    storeLevels: spec.stores.map((s) => s.initial),
    peaksKw: spec.grid.demandCharges.map((c) => c.existingPeakKw),
  };
  const scratch = createScheduleBuffers(spec);
  const result = await solveBudgetedWindow(ctx, window, guess, scratch);
  probes.push({ kind: 'seam-probe', window, result });
  if (endedWithoutSchedule(result)) return null;
  const start = advanceState(spec, ctx.facts.chargeSteps, guess, scratch, from, b);
  const end: WindowEndState = {
    socKwh: start.socKwh.slice(),
    storeLevels: start.storeLevels.slice(),
    unitTails: spec.units.map((u, i) => scratch.units[i].on.slice(b - Math.min(memoryOf(u), b - from), b)),
    // A ramp carries the output across the seam, so the segment before must end at it too.
    unitPowerKw: spec.units.map((u, i) => (u.rampUpKwPerMin !== null || u.rampDownKwPerMin !== null) && start.units[i].on ? start.units[i].powerKw : null),
  };
  return { start, end };
}

/** A segment ended in the state its successor started from (SOC, levels and ramped outputs within a millionth of their range). */
function metSeam(spec: ResolvedSiteSpec, state: WindowStartState, seam: Seam): boolean {
  return sameState(spec, state, seam.start, SEAM_SOC_TOLERANCE);
}

/**
 * A rolling-horizon solve. A long horizon is cut into segments (horizon-windows.ts) solved side
 * by side, each a sequence of windows, meeting at seams whose state probes chose in advance.
 * Whatever goes wrong at a seam — a probe without a schedule, a segment's last window unable to
 * reach the seam's state, a segment infeasible from it, a state missed — the horizon is solved
 * on from before that seam as one sequence, as without segments, so segments never make a spec
 * infeasible that a single sequence solves.
 */
export async function solveRolling(ctx: SolveContext, segments: RollingSegment[]): Promise<HorizonSolve> {
  const { spec } = ctx;
  if (segments.length === 1) {
    const end = await solveSequence(ctx, segments[0].windows, initialState(spec));
    return { records: end.records, failed: failedRecord(end), segments: 1 };
  }

  const stop = new AbortController();
  const abortAll = () => stop.abort();
  ctx.signal?.addEventListener('abort', abortAll, { once: true });
  const inner: SolveContext = { ...ctx, signal: stop.signal };
  const probes: WindowRecord[] = [];
  let timedOut: WindowRecord | null = null;
  try {
    const seams = segments.slice(1).map((seg) => probeSeam(inner, seg.from, probes));
    const runs = segments.map(async (seg, k): Promise<SequenceEnd | null> => {
      const start = k === 0 ? initialState(spec) : ((await seams[k - 1])?.start ?? null);
      if (!start) return null;
      const end = k < seams.length ? async () => (await seams[k])?.end ?? null : undefined;
      let out: SequenceEnd;
      try {
        out = await solveSequence(inner, seg.windows, start, end);
      } catch (err) {
        // A crashed solver ends the run: the other segments need not go on.
        stop.abort();
        throw err;
      }
      const lost = failedRecord(out);
      if (lost?.result.outcome === 'no-solution') {
        // The run's time is up: every other segment is stopped too.
        timedOut ??= lost;
        stop.abort();
      }
      return out;
    });
    const [settledRuns, settledSeams] = await Promise.all([Promise.allSettled(runs), Promise.allSettled(seams)]);
    if (ctx.signal?.aborted) throw new SolveAbortedError();
    if (timedOut) return { records: [timedOut, ...probes], failed: timedOut, segments: segments.length };
    // The first error that is not a segment stopped because of it.
    const crash = [...settledRuns, ...settledSeams].find((s) => s.status === 'rejected' && !(s.reason instanceof SolveAbortedError));
    if (crash?.status === 'rejected') throw crash.reason;
    const outs = settledRuns.map((s) => {
      if (s.status === 'rejected') throw s.reason;
      return s.value;
    });
    const seamOf = settledSeams.map((s) => {
      if (s.status === 'rejected') throw s.reason;
      return s.value;
    });

    const accepted: WindowRecord[] = [];
    const restart = async (window: HorizonWindow, state: WindowStartState): Promise<HorizonSolve> => {
      const rest = windowsBetween(spec, window.from, spec.horizon.steps, true);
      ctx.budget.replan(rest.length);
      const end = await solveSequence(ctx, rest, state);
      return { records: [...accepted, ...end.records, ...probes], failed: failedRecord(end), segments: segments.length };
    };
    for (let k = 0; k < segments.length; k++) {
      const out = outs[k];
      const last = segments[k].windows.length - 1;
      const seamAfter = k < seamOf.length ? seamOf[k] : null;
      // No seam before this segment: the previous one ended freely; go on from its end.
      if (!out) return restart(segments[k].windows[0], outs[k - 1]!.state);
      if (out.failedAt !== null) {
        if (seamAfter && out.failedAt === last) {
          accepted.push(...out.records.slice(0, last));
          return restart(segments[k].windows[last], out.statesBefore[last]);
        }
        if (k === 0) return { records: [...accepted, ...out.records, ...probes], failed: failedRecord(out), segments: segments.length };
        // Infeasible from the seam's state: solve on from before the previous segment's last window.
        const prev = outs[k - 1]!;
        const prevLast = segments[k - 1].windows.length - 1;
        accepted.splice(accepted.length - 1, 1);
        return restart(segments[k - 1].windows[prevLast], prev.statesBefore[prevLast]);
      }
      if (seamAfter && !metSeam(spec, out.state, seamAfter)) {
        accepted.push(...out.records.slice(0, last));
        return restart(segments[k].windows[last], out.statesBefore[last]);
      }
      accepted.push(...out.records);
    }
    return { records: [...accepted, ...probes], failed: null, segments: segments.length };
  } finally {
    ctx.signal?.removeEventListener('abort', abortAll);
  }
}
