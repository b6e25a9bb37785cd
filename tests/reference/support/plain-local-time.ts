/**
 * Which steps a demand-charge window holds, read from SPEC.md §5 alone for the plain formulation:
 * a step belongs to the window when its START, in local time, falls in [from, to) on one of the
 * window's ISO weekdays, the weekday being the step's own local date. `from` after `to` wraps past
 * midnight, `from` equal to `to` is empty, "24:00" is the end of the day. Local time is the
 * horizon's IANA zone (daylight saving included), or the fixed UTC offset written on `start`.
 *
 * Written with the runtime's Intl time-zone data: the calendar date and clock time of each
 * instant are read off `formatToParts`, and the weekday is computed from that date. Shares
 * nothing with the engine's reading of windows, nor with its verifier's.
 */
import type { ResolvedDemandCharge, ResolvedSiteSpec } from '@gridwright/shared/site-spec';

export interface LocalClockTime {
  /** ISO weekday of the local date, 1 = Monday … 7 = Sunday. */
  isoWeekday: number;
  /** Minutes since local midnight. */
  minuteOfDay: number;
}

/** How a (deliberately wrong) reading may differ from SPEC §5, for the checks that prove the reference cases discriminate. */
export interface WindowReading {
  /** Read the window in UTC instead of local time. */
  utc?: boolean;
  /** Include the step that starts exactly at `to`. */
  toInclusive?: boolean;
  /** Leave out the step that starts exactly at `from`. */
  fromExclusive?: boolean;
}

function offsetMinutesWrittenOn(iso: string): number {
  if (iso.endsWith('Z') || iso.endsWith('z')) return 0;
  const match = /([+-])(\d\d):(\d\d)$/.exec(iso);
  if (!match) throw new Error(`no UTC offset on ${iso}`);
  const size = Number(match[2]) * 60 + Number(match[3]);
  return match[1] === '+' ? size : -size;
}

/** The local calendar date and clock time of an instant, in `zone` (an IANA name). */
function readClock(epochMs: number, zone: string): LocalClockTime {
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone: zone,
    year: 'numeric',
    month: 'numeric',
    day: 'numeric',
    hour: 'numeric',
    minute: 'numeric',
    hourCycle: 'h23',
  }).formatToParts(new Date(epochMs));
  const field = (type: Intl.DateTimeFormatPartTypes) => Number(parts.find((p) => p.type === type)?.value);
  // getUTCDay of the local calendar date: 0 = Sunday … 6 = Saturday.
  const sundayBased = new Date(Date.UTC(field('year'), field('month') - 1, field('day'))).getUTCDay();
  return { isoWeekday: sundayBased === 0 ? 7 : sundayBased, minuteOfDay: field('hour') * 60 + field('minute') };
}

/** Local clock time of the start of every step of the horizon. */
export function localStepStarts(horizon: ResolvedSiteSpec['horizon'], utc = false): LocalClockTime[] {
  const startMs = Date.parse(horizon.start);
  const fixedShift = utc || horizon.timeZone !== null ? 0 : offsetMinutesWrittenOn(horizon.start);
  const zone = utc || horizon.timeZone === null ? 'UTC' : horizon.timeZone;
  return Array.from({ length: horizon.steps }, (_, t) => readClock(startMs + (t * horizon.stepMinutes + fixedShift) * 60_000, zone));
}

const clockMinutes = (hhmm: string) => Number(hhmm.slice(0, 2)) * 60 + Number(hhmm.slice(3, 5));

/** The steps whose start falls in the charge's window. */
export function windowSteps(horizon: ResolvedSiteSpec['horizon'], charge: ResolvedDemandCharge, reading: WindowReading = {}): number[] {
  const from = clockMinutes(charge.window.from);
  const to = clockMinutes(charge.window.to);
  const afterFrom = (m: number) => (reading.fromExclusive ? m > from : m >= from);
  const beforeTo = (m: number) => (reading.toInclusive ? m <= to : m < to);
  const inClock = (m: number) => {
    if (from === to) return false;
    if (from < to) return afterFrom(m) && beforeTo(m);
    return afterFrom(m) || beforeTo(m);
  };
  const steps: number[] = [];
  localStepStarts(horizon, reading.utc).forEach((clock, t) => {
    if (charge.window.daysOfWeek.includes(clock.isoWeekday) && inClock(clock.minuteOfDay)) steps.push(t);
  });
  return steps;
}
