/** One rule a schedule breaks, with the step and the spec field it is about. */
export interface ScheduleViolation {
  code: string;
  message: string;
  step?: number;
  pointer?: string;
}

/** Beyond this many the list ends with one summary entry, so a broken year stays readable. */
export const MAX_REPORTED_VIOLATIONS = 200;

export function fmt(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toPrecision(8).replace(/\.?0+$/, '');
}

export class ViolationList {
  readonly items: ScheduleViolation[] = [];
  private dropped = 0;

  add(code: string, message: string, step?: number, pointer?: string): void {
    if (this.items.length < MAX_REPORTED_VIOLATIONS) {
      const v: ScheduleViolation = { code, message };
      if (step !== undefined) v.step = step;
      if (pointer !== undefined) v.pointer = pointer;
      this.items.push(v);
    } else {
      this.dropped++;
    }
  }

  finish(): ScheduleViolation[] {
    if (this.dropped > 0) {
      this.items.push({ code: 'more-violations', message: `${this.dropped} further violations not listed` });
    }
    return this.items;
  }
}

/** A series of one value per step, every one finite; a violation names what is wrong otherwise. */
export function seriesOk(
  list: ViolationList,
  series: readonly number[] | undefined,
  steps: number,
  pointer: string,
  label: string,
): series is readonly number[] {
  if (!Array.isArray(series)) {
    list.add('missing-series', `schedule has no ${label} series`, undefined, pointer);
    return false;
  }
  if (series.length !== steps) {
    list.add('length', `${label} has ${series.length} values, the horizon has ${steps} steps`, undefined, pointer);
    return false;
  }
  for (let t = 0; t < steps; t++) {
    if (typeof series[t] !== 'number' || !Number.isFinite(series[t])) {
      list.add('non-finite', `${label} at step ${t} is not a finite number`, t, pointer);
      return false;
    }
  }
  return true;
}
