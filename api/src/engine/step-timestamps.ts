import { DateTime, FixedOffsetZone, type Zone } from 'luxon';

/** The zone local times are read in: the horizon's IANA zone, or the start's own fixed UTC offset. */
export function horizonZone(start: string, timeZone: string | null): Zone | string {
  if (timeZone) return timeZone;
  return FixedOffsetZone.instance(DateTime.fromISO(start, { setZone: true }).offset);
}

function stepInstant(start: string, stepMinutes: number, t: number): number {
  return Date.parse(start) + t * stepMinutes * 60_000;
}

/**
 * The start of every step in local time with its UTC offset: the horizon's zone (offsets follow
 * daylight saving), or without one the start's own fixed offset.
 */
export function stepTimestamps(start: string, stepMinutes: number, steps: number, timeZone: string | null = null): string[] {
  const zone = horizonZone(start, timeZone);
  const out = new Array<string>(steps);
  for (let t = 0; t < steps; t++) {
    out[t] = DateTime.fromMillis(stepInstant(start, stepMinutes, t), { zone }).toISO({ suppressMilliseconds: true })!;
  }
  return out;
}

export interface LocalStepTime {
  /** ISO weekday of the step's local date: 1 = Monday … 7 = Sunday. */
  weekday: number;
  /** Minutes since local midnight at the step's start. */
  minuteOfDay: number;
}

export function localStepTimes(start: string, stepMinutes: number, steps: number, timeZone: string | null): LocalStepTime[] {
  const zone = horizonZone(start, timeZone);
  const out = new Array<LocalStepTime>(steps);
  for (let t = 0; t < steps; t++) {
    const local = DateTime.fromMillis(stepInstant(start, stepMinutes, t), { zone });
    out[t] = { weekday: local.weekday, minuteOfDay: local.hour * 60 + local.minute };
  }
  return out;
}
