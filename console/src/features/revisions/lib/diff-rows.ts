import type { RevisionDiff } from '@gridwright/shared/revisions';

type Setpoint = RevisionDiff['setpoints'][number];

/** Changed setpoints first, the most changed steps first; unchanged ones after, in the export's order. */
export function changedFirst(setpoints: Setpoint[]): Setpoint[] {
  return setpoints
    .map((s, i) => ({ s, i }))
    .sort((a, b) => b.s.changedSteps - a.s.changedSteps || a.i - b.i)
    .map(({ s }) => s);
}

/** Differences below this are float noise, as the API counts them. */
const CHANGED = 1e-6;

/** The steps where one setpoint differs, with both values and the change, at most `limit` of them. */
export function changedSteps(diff: RevisionDiff, setpoint: Setpoint, limit: number) {
  const rows: { step: number; time: string; base: number; revision: number; change: number }[] = [];
  for (let t = 0; t < setpoint.revision.length && rows.length < limit; t++) {
    const change = setpoint.revision[t] - setpoint.base[t];
    if (Math.abs(change) > CHANGED) rows.push({ step: diff.fromRootStep + t, time: diff.timestamps[t], base: setpoint.base[t], revision: setpoint.revision[t], change });
  }
  return rows;
}

/** Chart points of one setpoint, every k-th step past `max` points so a year stays drawable. */
export function setpointPoints(diff: RevisionDiff, setpoint: Setpoint, max = 720) {
  const every = Math.max(1, Math.ceil(setpoint.revision.length / max));
  const points: { time: string; base: number; revision: number }[] = [];
  for (let t = 0; t < setpoint.revision.length; t += every) points.push({ time: diff.timestamps[t], base: setpoint.base[t], revision: setpoint.revision[t] });
  return { points, sampled: every > 1 };
}
