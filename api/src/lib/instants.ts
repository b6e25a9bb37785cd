import { DateTime } from 'luxon';
import { validationProblem } from './problem';

/**
 * The instants every input is held to before it reaches a timestamptz column. JavaScript's Date
 * and the validator's date-time format accept strings PostgreSQL refuses (30 February, year 0000,
 * a +16:00 offset); luxon checks the calendar, the instant is taken in UTC (so any offset a
 * client writes is fine), and its year must lie in 0001–9999.
 */
const FIRST_YEAR = 1;
const LAST_YEAR = 9999;

/** The instant `text` names, or why it names none. */
export function readInstant(text: string): { ok: true; at: DateTime } | { ok: false; reason: string } {
  const parsed = DateTime.fromISO(text, { setZone: true });
  if (!parsed.isValid) return { ok: false, reason: `"${text}" is not an ISO 8601 date-time (${parsed.invalidExplanation ?? parsed.invalidReason})` };
  return instantInRange(parsed);
}

/** An instant from another reader (a CSV's local times), held to the same range. */
export function instantInRange(at: DateTime): { ok: true; at: DateTime } | { ok: false; reason: string } {
  const year = at.toUTC().year;
  if (year < FIRST_YEAR || year > LAST_YEAR) return { ok: false, reason: `${at.toISO()} is outside the years ${String(FIRST_YEAR).padStart(4, '0')}–${LAST_YEAR}` };
  return { ok: true, at };
}

/** An optional date-time input as a Date, or a 400 naming `pointer`. */
export function optionalInstant(value: unknown, pointer: string): Date | undefined {
  if (value === undefined || value === null || value === '') return undefined;
  const read = typeof value === 'string' ? readInstant(value) : ({ ok: false, reason: 'must be an ISO 8601 date-time string' } as const);
  if (!read.ok) throw validationProblem([{ pointer, message: read.reason }]);
  return read.at.toJSDate();
}
