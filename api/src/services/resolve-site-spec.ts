import { DateTime } from 'luxon';
import type { EntityManager } from 'typeorm';
import { resolveDefaults, validateSiteSpec, type ResolvedSiteSpec, type SpecIssue, type ValidSiteSpec } from '@gridwright/shared/site-spec';
import { Series } from '../db/entities/series';
import { kwValueRefusal } from '../lib/kw-values';
import { validationProblem } from '../lib/problem';

export type SiteSpecResolution = { ok: true; spec: ValidSiteSpec; resolved: ResolvedSiteSpec } | { ok: false; errors: SpecIssue[] };

/**
 * A spec, as a client sent it or as a run stored it, made the engine's input: validated against
 * SPEC.md §1, the series its supply names looked up in the tenant, every default resolved. The
 * validate route, a submission and the worker each go through here once.
 */
export async function resolveSiteSpecForTenant(manager: EntityManager, tenantId: string, input: unknown): Promise<SiteSpecResolution> {
  const checked = validateSiteSpec(input);
  if (!checked.ok) return checked;
  const supply = await lookupSupplySeries(manager, tenantId, checked.spec);
  if (!supply.ok) return supply;
  return { ok: true, spec: checked.spec, resolved: resolveDefaults(checked.spec, supply.availableKw) };
}

/** The same for a request body: a spec that does not resolve is a 400 naming each field. */
export async function resolveRequestSpec(manager: EntityManager, tenantId: string, body: unknown): Promise<{ spec: ValidSiteSpec; resolved: ResolvedSiteSpec }> {
  const resolution = await resolveSiteSpecForTenant(manager, tenantId, body);
  if (!resolution.ok) throw validationProblem(resolution.errors);
  return resolution;
}

type SupplyLookup = { ok: true; availableKw: number[] | undefined } | { ok: false; errors: SpecIssue[] };

/**
 * The availability a spec's `supply: { seriesId }` names: the tenant's series, cut to the
 * horizon. The series must use the horizon's step and cover every step of it.
 */
async function lookupSupplySeries(manager: EntityManager, tenantId: string, spec: ValidSiteSpec): Promise<SupplyLookup> {
  if (!('seriesId' in spec.supply)) return { ok: true, availableKw: undefined };
  const pointer = '/supply/seriesId';
  const series = await manager.findOneBy(Series, { id: spec.supply.seriesId, tenantId });
  if (!series) return { ok: false, errors: [{ pointer, message: `no series "${spec.supply.seriesId}" in this tenant` }] };
  if (series.kind !== 'power') {
    return { ok: false, errors: [{ pointer, message: `the series "${series.name}" holds a ${series.kind} (${series.unit}); the supply is a power in kW` }] };
  }
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
  const availableKw = series.values.slice(first, last);
  // Series stored before uploads were held to the spec's limits may hold values a spec may not.
  const bad = availableKw.findIndex((kw) => typeof kw !== 'number' || kwValueRefusal(kw) !== null);
  if (bad >= 0) {
    return { ok: false, errors: [{ pointer, message: `the series' value for step ${bad} (${availableKw[bad]}) ${kwValueRefusal(availableKw[bad] ?? NaN)}; upload it again` }] };
  }
  return { ok: true, availableKw };
}
