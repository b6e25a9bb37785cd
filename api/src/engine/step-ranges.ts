import type { StepRange } from '@gridwright/shared/run-result';

/** Sorted steps → maximal runs of consecutive steps. */
export function toStepRanges(steps: ArrayLike<number>): StepRange[] {
  const ranges: StepRange[] = [];
  for (let i = 0; i < steps.length; i++) {
    const t = steps[i];
    const last = ranges[ranges.length - 1];
    if (last && t === last.to + 1) last.to = t;
    else if (!last || t > last.to) ranges.push({ from: t, to: t });
  }
  return ranges;
}

/** "steps 0–6, 12" for messages; long lists are cut after a few ranges. */
export function describeRanges(ranges: StepRange[]): string {
  const shown = ranges.slice(0, 5).map((r) => (r.from === r.to ? `${r.from}` : `${r.from}–${r.to}`));
  const more = ranges.length > 5 ? ` and ${ranges.length - 5} more ranges` : '';
  const single = ranges.length === 1 && ranges[0].from === ranges[0].to;
  return `${single ? 'step' : 'steps'} ${shown.join(', ')}${more}`;
}
