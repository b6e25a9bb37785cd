import { stringify } from 'csv-stringify/sync';
import { DateTime } from 'luxon';
import type { Schedule } from '@gridwright/shared/run-result';

/**
 * The schedule as RFC 4180 CSV for a SCADA import: one row per step, a timestamp column, then
 * site-level columns and each asset's columns. Column names default to `<asset>.<quantity>`
 * (e.g. `ely-1.powerKw`); a tag map renames any of them to the integrator's tag names.
 */
export interface ScheduleCsvOptions {
  powerUnit: 'kW' | 'MW';
  /** `utc`: ISO 8601 in UTC (`Z`); `offset`: as in the spec, with its offset. */
  timestamps: 'utc' | 'offset';
  delimiter: string;
  tagMap: Record<string, string>;
}

interface Column {
  key: string;
  values: number[];
  /** Power columns scale with the unit; on/off and energy columns do not. */
  kind: 'power' | 'flag' | 'energy';
}

export function scheduleColumns(schedule: Schedule): Column[] {
  const cols: Column[] = [
    { key: 'site.supplyUsedKw', values: schedule.supplyUsedKw, kind: 'power' },
    { key: 'site.curtailedKw', values: schedule.curtailedKw, kind: 'power' },
    { key: 'site.unservedKw', values: schedule.unservedKw, kind: 'power' },
    { key: 'grid.importKw', values: schedule.grid.importKw, kind: 'power' },
    { key: 'grid.exportKw', values: schedule.grid.exportKw, kind: 'power' },
  ];
  for (const [id, u] of Object.entries(schedule.units)) {
    cols.push({ key: `${id}.on`, values: u.on, kind: 'flag' });
    cols.push({ key: `${id}.powerKw`, values: u.powerKw, kind: 'power' });
  }
  for (const [id, s] of Object.entries(schedule.storage)) {
    cols.push({ key: `${id}.chargeKw`, values: s.chargeKw, kind: 'power' });
    cols.push({ key: `${id}.dischargeKw`, values: s.dischargeKw, kind: 'power' });
    cols.push({ key: `${id}.socKwh`, values: s.socKwh, kind: 'energy' });
  }
  return cols;
}

function header(key: string, kind: Column['kind'], unit: 'kW' | 'MW') {
  if (unit === 'MW' && kind === 'power') return key.replace(/Kw$/, 'Mw');
  if (unit === 'MW' && kind === 'energy') return key.replace(/Kwh$/, 'Mwh');
  return key;
}

export function scheduleToCsv(schedule: Schedule, opts: ScheduleCsvOptions): string {
  const cols = scheduleColumns(schedule);
  const factor = opts.powerUnit === 'MW' ? 1 / 1000 : 1;
  const names = ['timestamp', ...cols.map((c) => opts.tagMap[c.key] ?? header(c.key, c.kind, opts.powerUnit))];
  const rows = schedule.timestamps.map((ts, t) => [
    opts.timestamps === 'utc' ? DateTime.fromISO(ts, { setZone: true }).toUTC().toISO({ suppressMilliseconds: true }) : ts,
    ...cols.map((c) => (c.kind === 'flag' ? c.values[t] : round(c.values[t] * factor))),
  ]);
  return stringify([names, ...rows], { delimiter: opts.delimiter, record_delimiter: '\r\n'});
}

/** Enough digits for watts in MW, and no binary noise like 0.30000000000000004 in the file. */
const round = (v: number) => Math.round(v * 1e9) / 1e9;
