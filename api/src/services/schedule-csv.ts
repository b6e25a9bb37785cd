import { stringify } from 'csv-stringify/sync';
import { DateTime } from 'luxon';
import type { Schedule } from '@gridwright/shared/run-result';

/**
 * The schedule as RFC 4180 CSV for a SCADA import: one row per step, a timestamp column, then
 * site-level columns and each asset's columns. Column names default to `<asset>.<quantity>`
 * (e.g. `ely-1.powerKw`); a tag map renames any of them to the integrator's tag names.
 *
 * The v1 columns come first, in their v1 order, so an import that reads a v1 site's file keeps
 * working; the site model v1.1 (SPEC §5) adds its columns after them.
 */
export interface ScheduleCsvOptions {
  powerUnit: 'kW' | 'MW';
  /** `utc`: ISO 8601 in UTC (`Z`); `offset`: local time as the schedule has it (the horizon's time zone, or the start's offset). */
  timestamps: 'utc' | 'offset';
  delimiter: string;
  tagMap: Record<string, string>;
}

/**
 * How a column follows the power unit: `power` and `energy` scale with it (kW → MW, kWh → MWh),
 * `pricePerEnergy` inversely (money per kWh → per MWh); `flag` and the `store` quantities — in the
 * store's own unit, and money per unit of it — never do.
 */
type ColumnKind = 'power' | 'flag' | 'energy' | 'pricePerEnergy' | 'store';

interface Column {
  key: string;
  /** null where the schedule knows no value (a marginal value without a price): an empty field. */
  values: (number | null)[];
  kind: ColumnKind;
}

/** A result stored before v1.1 has none of its fields; such a schedule exports its v1 columns alone. */
type StoredSchedule = Omit<Schedule, 'stores' | 'reserve' | 'marginalValues'> & Partial<Pick<Schedule, 'stores' | 'reserve' | 'marginalValues'>>;

export function scheduleColumns(schedule: StoredSchedule): Column[] {
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
  if (schedule.reserve) {
    cols.push({ key: 'site.reserveRequiredKw', values: schedule.reserve.requiredKw, kind: 'power' });
    cols.push({ key: 'site.reserveHeldKw', values: schedule.reserve.providedKw, kind: 'power' });
    cols.push({ key: 'site.reserveShortfallKw', values: schedule.reserve.shortfallKw, kind: 'power' });
  }
  if (schedule.marginalValues) cols.push({ key: 'site.marginalValuePerKwh', values: schedule.marginalValues.energyPerKwh, kind: 'pricePerEnergy' });
  for (const [id, u] of Object.entries(schedule.units)) {
    if (u.reserveKw) cols.push({ key: `${id}.reserveKw`, values: u.reserveKw, kind: 'power' });
  }
  for (const [id, s] of Object.entries(schedule.storage)) {
    if (s.reserveKw) cols.push({ key: `${id}.reserveKw`, values: s.reserveKw, kind: 'power' });
  }
  for (const [id, s] of Object.entries(schedule.stores ?? {})) {
    cols.push({ key: `${id}.level`, values: s.level, kind: 'store' });
    cols.push({ key: `${id}.shortfall`, values: s.shortfall, kind: 'store' });
    cols.push({ key: `${id}.spill`, values: s.spill, kind: 'store' });
    const value = schedule.marginalValues?.stores[id];
    if (value) cols.push({ key: `${id}.marginalValue`, values: value, kind: 'store' });
  }
  return cols;
}

const inMw: Record<ColumnKind, { factor: number; rename: (key: string) => string }> = {
  power: { factor: 1 / 1000, rename: (key) => key.replace(/Kw$/, 'Mw') },
  energy: { factor: 1 / 1000, rename: (key) => key.replace(/Kwh$/, 'Mwh') },
  pricePerEnergy: { factor: 1000, rename: (key) => key.replace(/PerKwh$/, 'PerMwh') },
  flag: { factor: 1, rename: (key) => key },
  store: { factor: 1, rename: (key) => key },
};

export function scheduleToCsv(schedule: StoredSchedule, opts: ScheduleCsvOptions): string {
  const cols = scheduleColumns(schedule);
  const unit = (c: Column) => (opts.powerUnit === 'MW' ? inMw[c.kind] : { factor: 1, rename: (key: string) => key });
  const names = ['timestamp', ...cols.map((c) => opts.tagMap[c.key] ?? unit(c).rename(c.key))];
  const rows = schedule.timestamps.map((ts, t) => [
    opts.timestamps === 'utc' ? DateTime.fromISO(ts, { setZone: true }).toUTC().toISO({ suppressMilliseconds: true }) : ts,
    ...cols.map((c) => {
      const v = c.values[t];
      if (v === null || v === undefined) return '';
      return c.kind === 'flag' ? v : round(v * unit(c).factor);
    }),
  ]);
  return stringify([names, ...rows], { delimiter: opts.delimiter, record_delimiter: '\r\n' });
}

/** Enough digits for watts in MW, and no binary noise like 0.30000000000000004 in the file. */
const round = (v: number) => Math.round(v * 1e9) / 1e9;
