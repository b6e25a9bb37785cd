import type { CoefficientSpan, ModelReport, Schedule } from '@gridwright/shared/run-result';

/** Charts stay readable and fast past this many points; longer horizons are bucketed. */
export const MAX_CHART_POINTS = 720;

export interface SupplyPoint {
  step: number;
  time: string;
  availableKw: number;
  usedKw: number;
  curtailedKw: number;
}

export interface UnitStrip {
  id: string;
  /** Runs of equal state, in step order: [fromStep, toStep] inclusive. */
  segments: { from: number; to: number; on: boolean }[];
  onSteps: number;
}

export interface PowerPoint {
  step: number;
  time: string;
  [unitId: string]: number | string;
}

const round = (n: number, digits = 3) => Math.round(n * 10 ** digits) / 10 ** digits;

/**
 * Reduces rows to at most `max` by averaging fixed-size buckets of consecutive steps; each bucket
 * keeps its first step and time, so the x axis still reads as time. A value that is null at some
 * steps (a price not known, a line drawn only over a window) averages its known values, and stays
 * null in a bucket that has none.
 */
export function bucketRows<T extends { step: number; time: string }>(rows: T[], max = MAX_CHART_POINTS): T[] {
  if (rows.length <= max) return rows;
  const size = Math.ceil(rows.length / max);
  const out: T[] = [];
  for (let i = 0; i < rows.length; i += size) {
    const bucket = rows.slice(i, i + size) as Record<string, unknown>[];
    const merged: Record<string, unknown> = { ...bucket[0] };
    for (const key of Object.keys(bucket[0])) {
      if (key === 'step' || key === 'time') continue;
      const known = bucket.map((r) => r[key]).filter((v): v is number => typeof v === 'number');
      if (known.length > 0) merged[key] = round(known.reduce((acc, v) => acc + v, 0) / known.length, 6);
    }
    out.push(merged as T);
  }
  return out;
}

/** Available supply is what was used plus what was curtailed (SPEC.md §2: curtailed = W − g). */
export function supplyPoints(schedule: Schedule): SupplyPoint[] {
  return schedule.timestamps.map((time, step) => {
    const usedKw = schedule.supplyUsedKw[step] ?? 0;
    const curtailedKw = schedule.curtailedKw[step] ?? 0;
    return { step, time, availableKw: round(usedKw + curtailedKw), usedKw, curtailedKw };
  });
}

export function unitStrips(schedule: Schedule): UnitStrip[] {
  return Object.entries(schedule.units).map(([id, unit]) => {
    const segments: UnitStrip['segments'] = [];
    unit.on.forEach((v, step) => {
      const on = v >= 0.5;
      const last = segments[segments.length - 1];
      if (last && last.on === on) last.to = step;
      else segments.push({ from: step, to: step, on });
    });
    return { id, segments, onSteps: unit.on.filter((v) => v >= 0.5).length };
  });
}

/** The key of a unit's reserve held in a power row: unit ids never contain ":" (SPEC ids are letters, digits, ".", "_", "-"). */
export const reserveKey = (id: string) => `reserve:${id}`;

/** Each unit's power per step, and the reserve it holds where the schedule reports it (SPEC §5: providers only). */
export function unitPowerPoints(schedule: Schedule): PowerPoint[] {
  const units = Object.entries(schedule.units);
  return schedule.timestamps.map((time, step) => {
    const row: PowerPoint = { step, time };
    for (const [id, u] of units) {
      row[id] = u.powerKw[step] ?? 0;
      if (u.reserveKw) row[reserveKey(id)] = u.reserveKw[step] ?? 0;
    }
    return row;
  });
}

export interface CoefficientBar {
  name: keyof ModelReport['coefficientRange'];
  min: number;
  max: number;
  /** [log10(min), log10(max)]: what the log-scale bar spans. */
  span: [number, number];
  orders: number;
  healthy: boolean;
}

/**
 * The band coefficients should stay inside for a well-scaled model. Common practice for
 * double-precision MIP solvers (from memory of solver guidance, not a hard rule): keep every
 * coefficient within about 1e-3 … 1e6, and each family within about six orders of magnitude.
 */
export const HEALTHY_BAND: [number, number] = [1e-3, 1e6];
export const HEALTHY_ORDERS = 6;

export function coefficientBars(range: ModelReport['coefficientRange']): CoefficientBar[] {
  const names = ['matrix', 'objective', 'bounds', 'rhs'] as const;
  const bars: CoefficientBar[] = [];
  for (const name of names) {
    const span: CoefficientSpan = range[name];
    if (!span) continue;
    // A zero lower end (e.g. an all-zero rhs entry) has no logarithm; the bar starts at its smallest non-zero value instead.
    const min = span[0] > 0 ? span[0] : span[1];
    const max = span[1];
    if (!(max > 0)) continue;
    const lo = Math.log10(min);
    const hi = Math.log10(max);
    const orders = round(hi - lo, 2);
    bars.push({
      name,
      min,
      max,
      span: [round(lo), round(hi)],
      orders,
      healthy: min >= HEALTHY_BAND[0] && max <= HEALTHY_BAND[1] && orders <= HEALTHY_ORDERS,
    });
  }
  return bars;
}

/** "01 Mar 14:00" in the horizon's own offset as written in the timestamp, not the browser's zone. */
export function shortTime(iso: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})/.exec(iso);
  if (!m) return iso;
  const months = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
  return `${m[3]} ${months[Number(m[2]) - 1]} ${m[4]}:${m[5]}`;
}
