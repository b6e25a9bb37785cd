import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { buildWindowModel } from './build-window-model';
import { initialState, memoryOf } from './carry-state';
import { Deadline } from './deadline';
import { SolveBudget } from './solve-budget';
import { LP_BOUND_MARGIN, tinyAt } from './numerics';
import { planWindow, type HorizonWindow, type LinkPrices, type SiteFacts, type WindowStartState } from './plan-window';
import type { ScheduleBuffers } from './schedule-buffers';
import { SolveAbortedError, type SolverPort } from './solver-port';

/*
 * A proven upper bound on the whole horizon for a rolling solve (the objective is maximised).
 *
 * The model. Cut the horizon into blocks B_1 … B_K of consecutive steps. The SPEC §2/§5 model is
 *   max Σ_k f_k(x_k)  over x_k ∈ X_k(s_{k−1}),  s_k = e_k(x_k),  −D·peak,
 * where x_k are block k's variables, s_{k−1} the state it starts from (s_0 the spec's initial
 * state), e_k(x_k) the state it ends in and f_k its part of the objective. Three things link blocks:
 *   (a) each storage's SOC and each store's level (s_k = e_k(x_k));
 *   (b) a unit's on/off history — the start indicator at a block's first step, minimum up/down
 *       times, cold starts and ramps that read steps before it;
 *   (c) each demand charge, paid on one peak over the whole horizon: −D·(P − E) with
 *       P = max(E, import over the charge's steps) and E its existing peak.
 *
 * The relaxation R. For any prices λ_k (per kWh of SOC, per unit of product, k = 1 … K−1) and any
 * shares w_k ≥ 0 with Σ_k w_k = 1 per demand charge:
 *   (a) s_k = e_k(x_k) is dropped; block k+1 starts from a free state σ_k within the physical
 *       limits (SOC in [minSoc, capacity], level in [min, capacity]) and the objective gains
 *       λ_k·(e_k(x_k) − σ_k), which is 0 wherever the link holds;
 *   (b) rows of (b) that read a step before the block are dropped: block k+1 may start as if
 *       the unit had been on for long (no start, hence no start cost, at its first step; no
 *       cold start; no ramp from an output before), or stopped long ago (a start allowed at once);
 *       every other row is kept;
 *   (c) P ≥ max(E, import over the charge's steps in B_k) =: P_k for every k, so
 *       −D·(P − E) ≤ Σ_k w_k·(−D·(P_k − E)): block k pays w_k·D on its own peak above E.
 * Every schedule feasible for the spec restricts to blocks feasible in R (take σ_k = s_k; the
 * rows kept are rows of the spec's model, and the implied store floors of store-floors.ts hold
 * for any feasible schedule), and R's objective there is ≥ the spec's: (a) adds 0, (b) drops
 * only costs (start, cold start) and rows, (c) is the inequality above. So max R ≥ the spec's
 * optimum ≥ any schedule's objective, for every choice of λ and w. R has no constraint linking
 * two blocks, so max R is the sum of each block's own maximum, and any upper bound on each block's
 * maximum may stand in for it: the dual bound of its MIP, wherever the solver stopped, or the
 * optimum of its LP relaxation.
 *
 * The prices only decide how close the bound comes. The LP dual of the link (a) is the ideal
 * λ; the rolling schedule's marginal values estimate it (linkPrices); the shares of a demand
 * charge go to the blocks where the rolling schedule reached its peak.
 *
 * Numerics. Each block's bound is the solver's, exact to its feasibility tolerances; a margin of
 * LP_BOUND_MARGIN of each block's magnitude is added so a tolerance never puts the bound below
 * the optimum.
 */

/**
 * The blocks' MIPs may take this share of the time the schedule took (our choice: the bound
 * should cost a quarter more, not double the run); a MIP stopped early still gives a valid bound.
 */
export const BOUND_TIME_SHARE = 0.25;

export interface HorizonBound {
  /** The upper bound (money), or null when it could not be computed (see `reason`). */
  value: number | null;
  blocks: number;
  /** Solver time summed over the blocks. */
  solveSeconds: number;
  reason: string | null;
}

export interface HorizonBoundInput {
  spec: ResolvedSiteSpec;
  facts: SiteFacts;
  /** The rolling schedule, with its marginal values: they set the link prices. */
  schedule: ScheduleBuffers;
  solver: SolverPort;
  deadline: Deadline;
  signal?: AbortSignal;
}

/** The blocks: consecutive runs of the rolling window's length, each solved as one LP. */
export function boundBlocks(spec: ResolvedSiteSpec): { from: number; steps: number }[] {
  const T = spec.horizon.steps;
  const size = spec.solver.window.windowSteps;
  const blocks: { from: number; steps: number }[] = [];
  for (let from = 0; from < T; from += size) blocks.push({ from, steps: Math.min(size, T - from) });
  return blocks;
}

/**
 * What a kWh in storage `i` is worth at the end of step b − 1: the dual of its SOC row there in the
 * LP that priced the rolling schedule. Where that is unknown, read off the schedule: at
 * the next step the battery moves energy, a kWh charged cost the energy's marginal value over the
 * charge efficiency, a kWh discharged fetches it (less the cycle cost) times the discharge
 * efficiency; between moves the SOC's dual stays the same. Where it does not move within a
 * block's length, what a kWh discharged at b would fetch; `fallback` where no marginal value is known.
 */
function socLinkPrice(spec: ResolvedSiteSpec, schedule: ScheduleBuffers, i: number, b: number, fallback: number): number {
  const dual = schedule.socValue[i][b - 1];
  if (Number.isFinite(dual)) return dual;
  const s = spec.storage[i];
  const { charge, discharge } = schedule.storage[i];
  const fetch = (value: number) => (value - s.cycleCostPerKwh) * s.dischargeEfficiency;
  const end = Math.min(spec.horizon.steps, b + spec.solver.window.windowSteps);
  for (let t = b; t < end; t++) {
    const value = schedule.energyValue[t];
    if (!Number.isFinite(value)) break;
    if (discharge[t] > tinyAt(s.maxDischargeKw)) return fetch(value);
    if (charge[t] > tinyAt(s.maxChargeKw)) return value / s.chargeEfficiency;
  }
  return Number.isFinite(schedule.energyValue[b]) ? fetch(schedule.energyValue[b]) : fallback;
}

/** The prices of the state where block boundary `b` (the first step of a block) cuts the horizon. */
function linkPrices(input: HorizonBoundInput, b: number): LinkPrices {
  const { spec, facts, schedule } = input;
  const dh = spec.horizon.stepMinutes / 60;
  const fallback = facts.island;
  return {
    socPerKwh: spec.storage.map((_, i) => socLinkPrice(spec, schedule, i, b, fallback)),
    // The level before b enters the store row at b times what the store keeps over a step.
    storePerUnit: spec.stores.map((s, j) => {
      const value = schedule.storeValue[j][b];
      return Number.isFinite(value) ? (1 - s.lossPerHour * dh) * value : facts.storeValues[j];
    }),
  };
}

/** Per demand charge and block, its share: spread evenly over the blocks where the rolling schedule's import reached its peak. */
function peakShares(input: HorizonBoundInput, blocks: { from: number; steps: number }[]): number[][] {
  const { spec, facts, schedule } = input;
  const shares = blocks.map(() => spec.grid.demandCharges.map(() => 0));
  spec.grid.demandCharges.forEach((_, c) => {
    const steps = facts.chargeSteps[c];
    const blockPeak = blocks.map((b) => {
      let peak = -Infinity;
      for (let t = b.from; t < b.from + b.steps; t++) if (steps[t]) peak = Math.max(peak, schedule.imp[t]);
      return peak;
    });
    const top = Math.max(...blockPeak);
    if (top === -Infinity) return;
    const at = blockPeak.flatMap((p, k) => (p >= top - tinyAt(top) ? [k] : []));
    for (const k of at) shares[k][c] = 1 / at.length;
  });
  return shares;
}

/** A start state the relaxation leaves free: every unit on for as long as any rule reads back; SOC and levels are the block's own columns. */
function freeStart(spec: ResolvedSiteSpec): WindowStartState {
  return {
    units: spec.units.map((u) => ({ on: true, stepsInState: Math.max(1, memoryOf(u)), powerKw: null })),
    socKwh: spec.storage.map((s) => s.minSocKwh),
    storeLevels: spec.stores.map((s) => s.min),
    peaksKw: spec.grid.demandCharges.map((c) => c.existingPeakKw),
  };
}

/** A block's maximum bounded from above, in money (LP_BOUND_MARGIN included), or why not. */
type BlockBound = { value: number; seconds: number } | { value: null; seconds: number; reason: string };

const stepsOf = (w: HorizonWindow) => `steps ${w.from}–${w.from + w.steps - 1}`;

/**
 * One block: first as a MIP within its share of the bound's time — HiGHS's dual bound is valid
 * wherever it stopped, and tighter than the LP's once the search has run (the LP relaxation of
 * starts and minimum stable output is weak: measured 37 % above the optimum on three days of the
 * grid-tied bench site). A MIP that did not finish may hold a bound weaker than its LP's (stopped
 * before its root LP, the trivial one), so the block's LP is solved too, in the run's time, and
 * the lower of the two counts: each bounds the block's maximum.
 */
async function blockBound(input: HorizonBoundInput, window: HorizonWindow, start: WindowStartState, mipDeadline: Deadline, signal: AbortSignal): Promise<BlockBound> {
  const { spec, facts, solver } = input;
  let seconds = 0;
  let best: number | null = null;
  for (const integral of [true, false]) {
    const deadline = integral ? mipDeadline : input.deadline;
    if (deadline.remainingSeconds() <= 0) continue;
    const plan = planWindow(spec, facts, { ...window, links: { ...window.links!, integral } }, start);
    const built = buildWindowModel(plan);
    const res = await solver.solve(built.model, { deadline, mipGap: spec.solver.mipGap, signal });
    seconds += res.workerSeconds;
    const upper = res.killedAtDeadline ? null : integral ? res.dualBound : res.status === 'optimal' ? res.objective : null;
    if (upper !== null && Number.isFinite(upper)) {
      const value = (upper + built.objectiveOffset) * plan.scales.money;
      best = Math.min(best ?? Infinity, value + LP_BOUND_MARGIN * Math.max(1, Math.abs(value)));
    }
    if (integral && res.status === 'optimal' && best !== null) break;
  }
  if (best !== null) return { value: best, seconds };
  const late = input.deadline.remainingSeconds() <= 0;
  return { value: null, seconds, reason: late ? `the time limit ran out before the bound of ${stepsOf(window)} was proven` : `no bound was proven for ${stepsOf(window)}` };
}

/**
 * The bound of the comment above: the blocks solved side by side on the solver. The MIPs share
 * `seconds` (SolveBudget, as windows share a run's time); the LP fallback may use what is left
 * of the run's deadline. Null with a reason when a block gets no proven bound in time — never a
 * number that is not proven.
 */
export async function horizonBound(input: HorizonBoundInput, seconds: number): Promise<HorizonBound> {
  const { spec, solver } = input;
  const blocks = boundBlocks(spec);
  const prices = blocks.map((b) => (b.from === 0 ? null : linkPrices(input, b.from)));
  const shares = peakShares(input, blocks);
  const initial = initialState(spec);
  const free = freeStart(spec);
  const budget = new SolveBudget(Deadline.after(Math.min(seconds, input.deadline.remainingSeconds())), blocks.length, solver.concurrency);
  const stop = new AbortController();
  const abortAll = () => stop.abort();
  input.signal?.addEventListener('abort', abortAll, { once: true });
  try {
    const results = await Promise.all(
      blocks.map(async (b, k): Promise<BlockBound> => {
        const last = k === blocks.length - 1;
        const window: HorizonWindow = {
          from: b.from,
          steps: b.steps,
          commit: b.steps,
          isFinal: last,
          links: { start: prices[k], end: last ? null : prices[k + 1], peakShares: shares[k], integral: true },
        };
        try {
          const share = budget.nextWindowDeadline();
          const mipDeadline = share.remainingSeconds() < input.deadline.remainingSeconds() ? share : input.deadline;
          const r = await blockBound(input, window, k === 0 ? initial : free, mipDeadline, stop.signal);
          if (r.value === null) stop.abort();
          return r;
        } catch (err) {
          if (err instanceof SolveAbortedError && !input.signal?.aborted) return { value: null, seconds: 0, reason: 'stopped' };
          throw err;
        } finally {
          budget.windowDone();
        }
      }),
    );
    if (input.signal?.aborted) throw new SolveAbortedError();
    const solveSeconds = results.reduce((sum, r) => sum + r.seconds, 0);
    const failed = results.find((r) => r.value === null && r.reason !== 'stopped') ?? results.find((r) => r.value === null);
    if (failed && failed.value === null) return { value: null, blocks: blocks.length, solveSeconds, reason: failed.reason };
    return { value: results.reduce((sum, r) => sum + r.value!, 0), blocks: blocks.length, solveSeconds, reason: null };
  } finally {
    input.signal?.removeEventListener('abort', abortAll);
  }
}
