/** The offset of an ISO 8601 date-time in minutes east of UTC ("Z" ⇒ 0). */
function offsetMinutes(iso: string): number {
  const m = /([+-])(\d{2}):?(\d{2})$/.exec(iso);
  if (!m) return 0;
  const minutes = Number(m[2]) * 60 + Number(m[3]);
  return m[1] === '-' ? -minutes : minutes;
}

function formatOffset(minutes: number): string {
  if (minutes === 0) return 'Z';
  const sign = minutes < 0 ? '-' : '+';
  const abs = Math.abs(minutes);
  return `${sign}${String(Math.floor(abs / 60)).padStart(2, '0')}:${String(abs % 60).padStart(2, '0')}`;
}

/** The start of every step, written with the horizon start's own UTC offset (a fixed offset: no DST shifts). */
export function stepTimestamps(start: string, stepMinutes: number, steps: number): string[] {
  const offset = offsetMinutes(start);
  const suffix = formatOffset(offset);
  const t0 = Date.parse(start);
  const out = new Array<string>(steps);
  for (let t = 0; t < steps; t++) {
    const local = new Date(t0 + (t * stepMinutes + offset) * 60_000).toISOString();
    out[t] = local.slice(0, 19) + suffix;
  }
  return out;
}
