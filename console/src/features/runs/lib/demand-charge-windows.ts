import type { DemandChargeKpis, Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';

type DemandCharge = NonNullable<NonNullable<SiteSpec['grid']>['demandCharges']>[number];

/**
 * The local weekday (ISO: 1 = Monday … 7 = Sunday) and minute of the day of a step start. The
 * schedule's timestamps are written in the horizon's local time (its `timeZone`, or the start's
 * offset), so the wall clock is read from the text itself, never from the browser's zone.
 */
export function localClock(iso: string): { weekday: number; minuteOfDay: number } {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})/.exec(iso);
  if (!m) throw new Error(`not an ISO 8601 date-time: ${iso}`);
  const day = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]))).getUTCDay();
  return { weekday: day === 0 ? 7 : day, minuteOfDay: Number(m[4]) * 60 + Number(m[5]) };
}

const minutesOf = (hhmm: string) => Number(hhmm.slice(0, 2)) * 60 + Number(hhmm.slice(3, 5));

/**
 * Whether a charge's window covers a step that starts at this local time (SPEC §5): `from`
 * inclusive, `to` exclusive, "00:00"–"24:00" the whole day, `from` after `to` wraps past
 * midnight, `from` equal to `to` is empty; the weekday is the step's own local date. Absent parts
 * take the spec's defaults: every day, 00:00, 24:00.
 */
export function inChargeWindow(window: DemandCharge['window'], clock: { weekday: number; minuteOfDay: number }): boolean {
  const days = window?.daysOfWeek ?? [1, 2, 3, 4, 5, 6, 7];
  if (!days.includes(clock.weekday)) return false;
  const from = minutesOf(window?.from ?? '00:00');
  const to = minutesOf(window?.to ?? '24:00');
  if (from === to) return false;
  const m = clock.minuteOfDay;
  return from < to ? m >= from && m < to : m >= from || m < to;
}

/** A demand charge as the grid chart draws it: the peak it was billed on, over the steps of its window. */
export interface ChargeLine {
  id: string;
  peakKw: number;
  existingPeakKw: number;
  cost: number;
  /** Per step: whether the charge's window covers it. */
  inWindow: boolean[];
}

export function chargeLines(schedule: Schedule, charges: DemandCharge[], kpis: Record<string, DemandChargeKpis> | undefined): ChargeLine[] {
  const clocks = schedule.timestamps.map(localClock);
  return charges.map((c) => ({
    id: c.id,
    peakKw: kpis?.[c.id]?.peakKw ?? c.existingPeakKw ?? 0,
    existingPeakKw: c.existingPeakKw ?? 0,
    cost: kpis?.[c.id]?.cost ?? 0,
    inWindow: clocks.map((clock) => inChargeWindow(c.window, clock)),
  }));
}

export const peakKey = (id: string) => `peak:${id}`;
export const existingPeakKey = (id: string) => `existing:${id}`;

export interface GridPoint {
  step: number;
  time: string;
  importKw: number;
  /** Drawn below the axis, so negative. */
  exportKw: number;
  /** Per charge: its peak, and the peak it started from, at the steps of its window; null elsewhere. */
  [chargeKey: string]: number | string | null;
}

export function gridPoints(schedule: Schedule, charges: ChargeLine[] = []): GridPoint[] {
  return schedule.timestamps.map((time, step) => {
    const row: GridPoint = {
      step,
      time,
      importKw: schedule.grid.importKw[step] ?? 0,
      exportKw: -(schedule.grid.exportKw[step] ?? 0) || 0,
    };
    for (const c of charges) {
      row[peakKey(c.id)] = c.inWindow[step] ? c.peakKw : null;
      row[existingPeakKey(c.id)] = c.inWindow[step] ? c.existingPeakKw : null;
    }
    return row;
  });
}

/**
 * Runs of consecutive rows a charge's window covers, for shading: from the first covered row's
 * time to the time of the row after the run (where a step-after line leaves it), or to the last row.
 */
export function windowSpans(rows: GridPoint[], chargeId: string): [string, string][] {
  const spans: [string, string][] = [];
  let open: string | null = null;
  for (const row of rows) {
    const inside = row[peakKey(chargeId)] !== null;
    if (inside && open === null) open = row.time;
    if (!inside && open !== null) {
      spans.push([open, row.time]);
      open = null;
    }
  }
  if (open !== null) spans.push([open, rows[rows.length - 1].time]);
  return spans;
}
