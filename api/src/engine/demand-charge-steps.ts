import type { ResolvedDemandCharge, ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { localStepTimes } from './step-timestamps';

const minutesOf = (hhmm: string) => Number(hhmm.slice(0, 2)) * 60 + Number(hhmm.slice(3, 5));

/**
 * Whether a local time falls in a charge's daily window (SPEC §5): `from` inclusive, `to`
 * exclusive; "00:00"–"24:00" is the whole day, `from` after `to` wraps past midnight, and
 * `from` equal to `to` is empty. The weekday is always the step's own local date.
 */
export function inChargeWindow(charge: ResolvedDemandCharge, weekday: number, minuteOfDay: number): boolean {
  if (!charge.window.daysOfWeek.includes(weekday)) return false;
  const from = minutesOf(charge.window.from);
  const to = minutesOf(charge.window.to);
  if (from === to) return false;
  return from < to ? minuteOfDay >= from && minuteOfDay < to : minuteOfDay >= from || minuteOfDay < to;
}

/** Per demand charge, 1 at each step whose start (local time) its window covers. A solve computes it once (SiteFacts). */
export function demandChargeSteps(spec: ResolvedSiteSpec): Uint8Array[] {
  if (!spec.grid.demandCharges.length) return [];
  const { start, stepMinutes, steps, timeZone } = spec.horizon;
  const local = localStepTimes(start, stepMinutes, steps, timeZone);
  return spec.grid.demandCharges.map((charge) => {
    const mask = new Uint8Array(steps);
    for (let t = 0; t < steps; t++) mask[t] = inChargeWindow(charge, local[t].weekday, local[t].minuteOfDay) ? 1 : 0;
    return mask;
  });
}
