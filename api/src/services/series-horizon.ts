import { DateTime } from 'luxon';
import type { Series } from '../db/entities/series';

/** A spec's `horizon` as series offer it: the steps they all cover, in the zone their file was read in. */
export interface OfferedHorizon {
  start: string;
  stepMinutes: number;
  steps: number;
  timeZone?: string;
}

const MINUTE = 60_000;

type Timed = Pick<Series, 'start' | 'startOffset' | 'stepMinutes' | 'steps' | 'timeZone'>;

/** Where a series' timestamps are written: its IANA zone, else the fixed offset of its first timestamp. */
export function seriesZone(s: Pick<Series, 'startOffset' | 'timeZone'>): string {
  return s.timeZone ?? (s.startOffset === '+00:00' ? 'UTC' : `UTC${s.startOffset}`);
}

export const instantIn = (ms: number, zone: string) => DateTime.fromMillis(ms, { zone }).toISO({ suppressMilliseconds: true })!;

export const seriesEndMs = (s: Timed) => s.start.getTime() + s.steps * s.stepMinutes * MINUTE;

/**
 * The steps every series covers, or null when they share none or step differently. Uploads
 * resample to whole steps counted from the epoch, so series of one step length line up.
 */
export function commonSteps(series: Timed[]): { startMs: number; stepMinutes: number; steps: number } | null {
  const stepMinutes = series[0]?.stepMinutes;
  if (!stepMinutes || series.some((s) => s.stepMinutes !== stepMinutes)) return null;
  const startMs = Math.max(...series.map((s) => s.start.getTime()));
  const endMs = Math.min(...series.map(seriesEndMs));
  const steps = Math.floor((endMs - startMs) / (stepMinutes * MINUTE));
  return steps >= 1 ? { startMs, stepMinutes, steps } : null;
}

/** The horizon a set of series offers: their common steps, in the first zone one of them was read in. */
export function offeredHorizon(series: Timed[]): OfferedHorizon | null {
  const common = commonSteps(series);
  if (!common) return null;
  const zoned = series.find((s) => s.timeZone);
  return {
    start: instantIn(common.startMs, seriesZone(zoned ?? series[0])),
    stepMinutes: common.stepMinutes,
    steps: common.steps,
    ...(zoned?.timeZone ? { timeZone: zoned.timeZone } : {}),
  };
}
