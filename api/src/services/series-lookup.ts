import { DateTime } from 'luxon';
import type { EntityManager } from 'typeorm';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { Series } from '../db/entities/series';
import type { ProblemFieldError } from '../lib/problem';

export type SupplyLookup = { ok: true; availableKw: number[] | undefined } | { ok: false; errors: ProblemFieldError[] };

/**
 * The availability a spec's `supply: { seriesId }` names: the tenant's series, cut to the
 * horizon. The series must use the horizon's step and cover every step of it.
 */
export async function lookupSupplySeries(manager: EntityManager, tenantId: string, spec: SiteSpec): Promise<SupplyLookup> {
  if (!('seriesId' in spec.supply)) return { ok: true, availableKw: undefined };
  const pointer = '/supply/seriesId';
  const series = await manager.findOneBy(Series, { id: spec.supply.seriesId, tenantId });
  if (!series) return { ok: false, errors: [{ pointer, message: `no series "${spec.supply.seriesId}" in this tenant` }] };
  if (series.stepMinutes !== spec.horizon.stepMinutes) {
    return { ok: false, errors: [{ pointer, message: `the series has ${series.stepMinutes}-minute steps; horizon.stepMinutes is ${spec.horizon.stepMinutes}` }] };
  }
  const horizonStart = DateTime.fromISO(spec.horizon.start, { setZone: true });
  const offsetMinutes = horizonStart.diff(DateTime.fromJSDate(series.start), 'minutes').minutes;
  const first = offsetMinutes / series.stepMinutes;
  const last = first + spec.horizon.steps;
  if (!Number.isInteger(first) || first < 0 || last > series.steps) {
    const seriesEnd = DateTime.fromJSDate(series.start).plus({ minutes: series.steps * series.stepMinutes }).toUTC().toISO();
    return {
      ok: false,
      errors: [{ pointer, message: `the series covers ${DateTime.fromJSDate(series.start).toUTC().toISO()} to ${seriesEnd} in ${series.stepMinutes}-minute steps; it does not cover every step of the horizon` }],
    };
  }
  return { ok: true, availableKw: series.valuesKw.slice(first, last) };
}
