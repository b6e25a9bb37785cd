/**
 * Local weekday and minute of day of an instant, for the verifier's own reading of demand-charge
 * windows: through the runtime's Intl time-zone data for an IANA zone, or a fixed offset added to
 * UTC. Written apart from the engine's (luxon) reading on purpose.
 */
const WEEKDAYS: Record<string, number> = { Mon: 1, Tue: 2, Wed: 3, Thu: 4, Fri: 5, Sat: 6, Sun: 7 };

export function localClock(zone: string | null, fixedOffsetMinutes: number): (epochMs: number) => { weekday: number; minute: number } {
  if (zone === null) {
    return (ms) => {
      const local = new Date(ms + fixedOffsetMinutes * 60_000);
      return { weekday: ((local.getUTCDay() + 6) % 7) + 1, minute: local.getUTCHours() * 60 + local.getUTCMinutes() };
    };
  }
  const format = new Intl.DateTimeFormat('en-US', { timeZone: zone, weekday: 'short', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' });
  return (ms) => {
    const parts = Object.fromEntries(format.formatToParts(new Date(ms)).map((part) => [part.type, part.value]));
    return { weekday: WEEKDAYS[parts.weekday], minute: Number(parts.hour) * 60 + Number(parts.minute) };
  };
}

/** Minutes east of UTC written at the end of an ISO 8601 date-time ("Z" ⇒ 0). */
export function isoOffsetMinutes(iso: string): number {
  const m = /([+-])(\d{2}):?(\d{2})$/.exec(iso);
  if (!m) return 0;
  const minutes = Number(m[2]) * 60 + Number(m[3]);
  return m[1] === '-' ? -minutes : minutes;
}
