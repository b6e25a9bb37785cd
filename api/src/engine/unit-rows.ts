import type { WindowColumns } from './build-window-model';
import type { ModelAssembler } from './model-assembler';
import { RowKind } from './model-arrays';
import type { WindowPlan } from './plan-window';

/**
 * The rows of one unit over a window: output within [minStableKw, big-M]·on, its curve's slices,
 * start indicators, minimum up/down times, cold starts, ramps and reserve headroom. Steps where
 * the unit has no binary are off by construction and get no rows; a reference to such a step is
 * the constant 0.
 */
export function addUnitRows(a: ModelAssembler, plan: WindowPlan, cols: WindowColumns, i: number): void {
  const n = plan.window.steps;
  const P = plan.scales.powerKw;
  const u = plan.spec.units[i];
  const up = plan.units[i];
  const { on, start, power, slices, reserve } = cols.units[i];
  const minStable = u.minStableKw / P;

  for (let k = 0; k < n; k++) {
    if (on[k] < 0) continue;
    if (minStable > 0) {
      a.row(RowKind.UnitMinStable, k, i, 0, Infinity);
      a.entry(power[k], 1);
      a.entry(on[k], -minStable);
    }
    a.row(RowKind.UnitMaxPower, k, i, -Infinity, 0);
    a.entry(power[k], 1);
    a.entry(on[k], -up.bigM[k] / P);
    if (slices.length) {
      // p = Σ slices; a convex cost (concave value) fills the cheaper (dearer) slices first.
      a.row(RowKind.UnitCurve, k, i, 0, 0);
      a.entry(power[k], 1);
      for (const s of slices) a.entry(s[k], -1);
    }
    if (reserve[k] >= 0) {
      if (u.kind === 'generator') {
        // Spinning headroom: r ≤ rating·y − p.
        a.row(RowKind.UnitReserve, k, i, -Infinity, 0);
        a.entry(reserve[k], 1);
        a.entry(power[k], 1);
        a.entry(on[k], -u.ratingKw / P);
      } else {
        // A flexible load backs off: r ≤ p − minStableKw·y.
        a.row(RowKind.UnitReserve, k, i, -Infinity, 0);
        a.entry(reserve[k], 1);
        a.entry(power[k], -1);
        a.entry(on[k], minStable);
      }
    }
  }
  if (!up.needsStart) {
    addColdStartRows(a, plan, cols, i);
    return;
  }
  for (let k = 0; k < n; k++) {
    if (on[k] < 0) continue;
    // z_k ≥ y_k − y_{k−1}; a step without a binary is off, so a start after it counts as new.
    const prevOn = k === 0 ? (up.onBefore ? 1 : 0) : on[k - 1] >= 0 ? -1 : 0;
    if (prevOn === 1) continue;
    a.row(RowKind.UnitStart, k, i, 0, Infinity);
    a.entry(start[k], 1);
    a.entry(on[k], -1);
    if (prevOn === -1) a.entry(on[k - 1], 1);
  }
  if (u.minUpSteps > 1) {
    // A start in the last minUp steps keeps the unit on now: Σ z_τ ≤ y_k (τ = k−minUp+1 … k).
    for (let k = 0; k < n; k++) {
      if (on[k] < 0) continue;
      let count = 0;
      for (let tau = Math.max(0, k - u.minUpSteps + 1); tau < k; tau++) if (start[tau] >= 0) count++;
      if (count === 0) continue;
      a.row(RowKind.UnitMinUp, k, i, -Infinity, 0);
      for (let tau = Math.max(0, k - u.minUpSteps + 1); tau <= k; tau++) a.entry(start[tau], 1);
      a.entry(on[k], -1);
    }
  }
  if (u.minDownSteps > 1) {
    // On at j ⇒ no start in j+1 … j+minDown (a stop after j must last minDown steps): Σ z_τ + y_j ≤ 1.
    // The range is cut short by the window's end, never skipped: a stop in the window's last
    // minDown steps still may not be followed by a restart before it ends. Starts after an on state
    // before the window are in the plan's noStart.
    for (let j = 0; j < n - 1; j++) {
      if (on[j] < 0) continue;
      const last = Math.min(n - 1, j + u.minDownSteps);
      let count = 0;
      for (let tau = j + 1; tau <= last; tau++) if (start[tau] >= 0) count++;
      if (count === 0) continue;
      a.row(RowKind.UnitMinDown, last, i, -Infinity, 1);
      for (let tau = j + 1; tau <= last; tau++) a.entry(start[tau], 1);
      a.entry(on[j], 1);
    }
  }
  addColdStartRows(a, plan, cols, i);
  addRampRows(a, plan, cols, i);
}

/** Whether a start at local step k can be cold: possible at all, with no on step certain within the look-back. */
export function coldStartPossible(plan: WindowPlan, i: number, k: number): boolean {
  const up = plan.units[i];
  if (up.coldLookback === 0 || !up.hasBinary[k] || up.noStart[k] || up.forcedOff[k]) return false;
  for (let m = 1; m <= up.coldLookback; m++) {
    const tau = k - m;
    if (tau < 0 ? up.history[-tau - 1] : up.forcedOn[tau]) return false;
  }
  return true;
}

/**
 * A start is cold when the unit was off for all of the last `coldAfterSteps + 1` steps:
 * w_k ≥ y_k − Σ_{m=1…L} y_{k−m} (L = coldAfterSteps + 1), with w_k ≥ 0 paying cold − hot. Steps
 * before the window come from its start state as constants. Where an on step within the look-back
 * is certain (history or a unit forced on), no start there can be cold and the variable is left out.
 * Measured on the island demo site: the start-type form (hot ≤ the stops of the last coldAfterSteps
 * steps) tightens the LP bound by 0.6 % but took HiGHS 25 % more time, and adding start-up and
 * shut-down capability rows 75 % more; this form stays.
 */
function addColdStartRows(a: ModelAssembler, plan: WindowPlan, cols: WindowColumns, i: number): void {
  const L = plan.units[i].coldLookback;
  const n = plan.window.steps;
  const { on, coldStart } = cols.units[i];
  for (let k = 0; k < n; k++) {
    if (coldStart[k] < 0) continue;
    a.row(RowKind.UnitColdStart, k, i, 0, Infinity);
    a.entry(coldStart[k], 1);
    a.entry(on[k], -1);
    for (let m = 1; m <= L && k - m >= 0; m++) a.entry(on[k - m], 1);
  }
}

/**
 * SPEC §5 ramps with start/stop allowances SU = max(minStable, R_up), SD = max(minStable, R_down):
 *   up:   p_k − p_{k−1} ≤ R_up·y_{k−1} + SU·z_k
 *   down: p_{k−1} − p_k ≤ R_down·y_k + SD·x_k,  x_k = z_k − y_k + y_{k−1} (the stop at k)
 * Both need z exact, so z_k ≤ y_k and z_k + y_{k−1} ≤ 1 are added for ramped units. A row that can
 * never bind (a ramp at least the output range, an allowance at least the step's big-M) is left out.
 */
function addRampRows(a: ModelAssembler, plan: WindowPlan, cols: WindowColumns, i: number): void {
  const up = plan.units[i];
  const ramp = up.ramp;
  if (!ramp) return;
  const n = plan.window.steps;
  const P = plan.scales.powerKw;
  const u = plan.spec.units[i];
  const { on, start, power } = cols.units[i];
  const range = (k: number) => up.bigM[k] - u.minStableKw;
  const SU = ramp.startAllowance;
  const SD = ramp.stopAllowance;

  for (let k = 0; k < n; k++) {
    if (start[k] < 0) continue;
    a.row(RowKind.UnitStartExact, k, i, -Infinity, 0);
    a.entry(start[k], 1);
    a.entry(on[k], -1);
    if (k > 0 && on[k - 1] >= 0) {
      a.row(RowKind.UnitStartExact, k, i, -Infinity, 1);
      a.entry(start[k], 1);
      a.entry(on[k - 1], 1);
    }
  }

  if (ramp.up !== null) {
    const Rup = ramp.up;
    for (let k = 0; k < n; k++) {
      if (on[k] < 0) continue;
      const prevExists = k === 0 ? up.onBefore : on[k - 1] >= 0;
      if (!prevExists) {
        // Off before (by construction, or at step −1): the start allowance caps the first step.
        if (SU >= up.bigM[k]) continue;
        a.row(RowKind.UnitRampUp, k, i, -Infinity, 0);
        a.entry(power[k], 1);
        a.entry(on[k], -SU / P);
        continue;
      }
      // Step 0 after a unit that was on: its column bound already holds p_0 ≤ p_{−1} + R_up.
      if (k === 0) continue;
      if (Rup >= range(k) && SU >= up.bigM[k]) continue;
      a.row(RowKind.UnitRampUp, k, i, -Infinity, 0);
      a.entry(power[k], 1);
      a.entry(power[k - 1], -1);
      a.entry(on[k - 1], -Rup / P);
      a.entry(start[k], -SU / P);
    }
  }

  if (ramp.down !== null) {
    const Rdown = ramp.down;
    for (let k = 0; k < n; k++) {
      if (k === 0) {
        if (!up.onBefore || up.powerBefore === null) continue;
        // p_{−1} − p_0 ≤ R_down·y_0 + SD·(1 − y_0): from the output before the window.
        const rhs = (SD - up.powerBefore) / P;
        a.row(RowKind.UnitRampDown, 0, i, -Infinity, rhs);
        a.entry(power[0], -1);
        a.entry(on[0], (SD - Rdown) / P);
        continue;
      }
      if (on[k - 1] < 0) continue;
      if (on[k] < 0) {
        // Off at k by construction: the step before must end at or below the stop allowance.
        if (SD >= up.bigM[k - 1]) continue;
        a.row(RowKind.UnitRampDown, k, i, -Infinity, 0);
        a.entry(power[k - 1], 1);
        a.entry(on[k - 1], -SD / P);
        continue;
      }
      if (Rdown >= range(k - 1) && SD >= up.bigM[k - 1]) continue;
      a.row(RowKind.UnitRampDown, k, i, -Infinity, 0);
      a.entry(power[k - 1], 1);
      a.entry(power[k], -1);
      a.entry(on[k], (SD - Rdown) / P);
      a.entry(start[k], -SD / P);
      a.entry(on[k - 1], -SD / P);
    }
  }
}
