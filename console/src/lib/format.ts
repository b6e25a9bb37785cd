/**
 * The console's one number format, everywhere a figure is shown (tables, tiles, chart axes and
 * tooltips): thousands grouped, at most `digits` decimals. `signed` writes + before a positive
 * value, for figures whose sign carries meaning (net value: value positive, cost negative).
 */
const formats = new Map<string, Intl.NumberFormat>();

export function formatNumber(n: number | null | undefined, digits = 2, { signed = false } = {}): string {
  if (n === null || n === undefined || !Number.isFinite(n)) return '—';
  const key = `${digits}:${signed}`;
  let format = formats.get(key);
  if (!format) {
    format = new Intl.NumberFormat('en-GB', { maximumFractionDigits: digits, signDisplay: signed ? 'exceptZero' : 'auto' });
    formats.set(key, format);
  }
  return format.format(n);
}

export function formatSeconds(s: number | null | undefined): string {
  if (s === null || s === undefined || !Number.isFinite(s)) return '—';
  if (s < 1) return `${Math.round(s * 1000)} ms`;
  if (s < 120) return `${s.toFixed(1)} s`;
  return `${Math.floor(s / 60)} min ${Math.round(s % 60)} s`;
}

/** In the browser's time zone, or in `timeZone` (an IANA zone) when given, e.g. a site's own. */
export function formatDateTime(iso: string | null | undefined, timeZone?: string | null): string {
  if (!iso) return '—';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toLocaleString('en-GB', { year: 'numeric', month: 'short', day: '2-digit', hour: '2-digit', minute: '2-digit', timeZone: timeZone ?? undefined });
}

export function formatPercent(fraction: number | null | undefined, digits = 2): string {
  if (fraction === null || fraction === undefined || !Number.isFinite(fraction)) return '—';
  return `${(fraction * 100).toFixed(digits)} %`;
}
