/**
 * Minimum up/down times checked on the on/off sequence itself, not on constraint rows.
 *
 * The sequence is read as maximal runs of equal state. The state before the horizon is a run
 * of `initialSteps` steps in state `initialOn`, so the first run in the horizon continues it.
 * Every run that ends inside the horizon (the state changes at step t) must have lasted at
 * least minUpSteps (an on run) or minDownSteps (an off run); a run still going at the
 * horizon's end may be shorter, since the horizon cuts it. A run that began before the horizon
 * and had already lasted its minimum is free to end at step 0.
 */
export interface RunViolation {
  kind: 'min-up' | 'min-down';
  /** First step of the run in the horizon (0 for a run continued from the initial state). */
  fromStep: number;
  /** Step at which the state changed, i.e. the first step after the too-short run. */
  changedAt: number;
  /** Length of the run including steps before the horizon. */
  length: number;
  required: number;
  /** True when the run began before the horizon (the initial state). */
  initial: boolean;
}

export function findRunViolations(
  on: readonly number[],
  initialOn: boolean,
  initialSteps: number,
  minUpSteps: number,
  minDownSteps: number,
): RunViolation[] {
  const violations: RunViolation[] = [];
  let state = initialOn ? 1 : 0;
  let length = initialSteps;
  let fromStep = 0;
  let initial = true;
  for (let t = 0; t < on.length; t++) {
    if (on[t] === state) {
      length++;
      continue;
    }
    const required = state === 1 ? minUpSteps : minDownSteps;
    if (length < required) {
      violations.push({ kind: state === 1 ? 'min-up' : 'min-down', fromStep, changedAt: t, length, required, initial });
    }
    state = on[t];
    length = 1;
    fromStep = t;
    initial = false;
  }
  return violations;
}
