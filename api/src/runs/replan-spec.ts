import { escapeToken } from '@gridwright/shared/json-pointer';
import type { ReplanRequest } from '@gridwright/shared/revisions';
import type { ResolvedSiteSpec, SiteSpec, SpecIssue } from '@gridwright/shared/site-spec';
import { validationProblem } from '../lib/problem';
import type { SiteState, UnitState } from './planned-state';

/** Where a field of the re-planned spec came from in the request, so its errors name the request's field. */
type PointerPair = [specPointer: string, requestPointer: string];

export interface ReplanSpec {
  spec: SiteSpec;
  /** The request's pointer for an error in the re-planned spec, or null when the request did not set that field. */
  requestPointerOf(specPointer: string): string | null;
}

const at = (...tokens: (string | number)[]) => tokens.map((t) => `/${escapeToken(String(t))}`).join('');

/** A per-step array from step `from` on; a single figure stays as it is. */
function remaining<V>(value: V, from: number): V {
  return (Array.isArray(value) ? value.slice(from) : value) as V;
}

/** Ids in the request that name nothing in the parent's spec, each a field error. */
function unknownIds(request: ReplanRequest, spec: ResolvedSiteSpec): SpecIssue[] {
  const known = {
    storage: { ids: new Set(spec.storage.map((s) => s.id)), what: 'battery' },
    stores: { ids: new Set(spec.stores.map((s) => s.id)), what: 'store' },
    units: { ids: new Set(spec.units.map((u) => u.id)), what: 'unit' },
    demandCharges: { ids: new Set(spec.grid.demandCharges.map((c) => c.id)), what: 'demand charge' },
  };
  const issues: SpecIssue[] = [];
  for (const kind of ['storage', 'stores', 'units', 'demandCharges'] as const) {
    for (const id of Object.keys(request.state[kind])) {
      if (!known[kind].ids.has(id)) issues.push({ pointer: at('state', kind, id), message: `no ${known[kind].what} "${id}" in the parent's spec` });
    }
  }
  for (const id of Object.keys(request.series.storeDemandPerHour ?? {})) {
    if (!known.stores.ids.has(id)) issues.push({ pointer: at('series', 'storeDemandPerHour', id), message: `no store "${id}" in the parent's spec` });
  }
  if (spec.grid.island) {
    for (const price of ['importPrice', 'exportPrice'] as const) {
      if (request.series[price] !== undefined) issues.push({ pointer: at('series', price), message: "the parent's spec has no grid connection to price" });
    }
  }
  if (!spec.reserve && request.series.reserveUpKw !== undefined) {
    issues.push({ pointer: at('series', 'reserveUpKw'), message: "the parent's spec has no reserve requirement; add one in a new run" });
  }
  return issues;
}

/** A unit's state at the re-plan time: what was measured, the rest as planned. */
function unitStateAt(id: string, measured: ReplanRequest['state']['units'][string] | undefined, planned: UnitState): UnitState | SpecIssue {
  if (!measured) return planned;
  const on = measured.on ?? planned.on;
  if (on !== planned.on && measured.stepsInState === undefined) {
    return {
      pointer: at('state', 'units', id, 'stepsInState'),
      message: `required: the unit is measured ${on ? 'on' : 'off'} where the plan has it ${planned.on ? 'on' : 'off'}, so the plan cannot say for how long`,
    };
  }
  return {
    on,
    stepsInState: measured.stepsInState ?? planned.stepsInState,
    powerKw: measured.powerKw ?? (on && planned.on ? planned.powerKw : null),
  };
}

/**
 * The spec of a re-plan: the parent's spec as submitted, from step `from` to the end of its
 * horizon, starting from the measured state (what the request leaves out, as planned) and with
 * the request's fresh series. Refuses, naming the request's field, ids the parent does not have and
 * a unit measured in another state than planned without its time in that state. Whether the
 * result is a valid spec (measured values within their limits, series of the right length) is
 * for validation, whose errors `requestPointerOf` leads back to the request.
 */
export function buildReplanSpec(
  parent: SiteSpec,
  resolved: ResolvedSiteSpec,
  planned: SiteState,
  request: ReplanRequest,
  start: { from: number; startsAt: string; name: string },
): ReplanSpec {
  const { from } = start;
  const { state, series } = request;
  const issues = unknownIds(request, resolved);
  const units = new Map<string, UnitState>();
  for (const u of resolved.units) {
    const unit = unitStateAt(u.id, state.units[u.id], planned.units.get(u.id)!);
    if ('pointer' in unit) issues.push(unit);
    else units.set(u.id, unit);
  }
  if (issues.length) throw validationProblem(issues);

  const pairs: PointerPair[] = [];
  const fromRequest = (specPointer: string, requestPointer: string, given: unknown) => {
    if (given !== undefined) pairs.push([specPointer, requestPointer]);
  };
  fromRequest('/supply/availableKw', '/series/supplyKw', series.supplyKw);
  fromRequest('/siteLoad/kw', '/series/siteLoadKw', series.siteLoadKw);
  fromRequest('/grid/importPrice', '/series/importPrice', series.importPrice);
  fromRequest('/grid/exportPrice', '/series/exportPrice', series.exportPrice);
  fromRequest('/reserve/upKw', '/series/reserveUpKw', series.reserveUpKw);

  const spec: SiteSpec = {
    ...parent,
    name: start.name,
    horizon: { ...parent.horizon, start: start.startsAt, steps: parent.horizon.steps - from },
    supply: series.supplyKw ? { availableKw: series.supplyKw } : 'availableKw' in parent.supply ? { availableKw: parent.supply.availableKw.slice(from) } : parent.supply,
    units: (parent.units ?? []).map((u, i) => {
      const measured = state.units[u.id];
      for (const field of ['on', 'stepsInState', 'powerKw'] as const) fromRequest(at('units', i, 'initial', field), at('state', 'units', u.id, field), measured?.[field]);
      const { on, stepsInState, powerKw } = units.get(u.id)!;
      return { ...u, initial: { on, stepsInState, ...(powerKw !== null ? { powerKw } : {}) } };
    }),
    storage: (parent.storage ?? []).map((s, i) => {
      fromRequest(at('storage', i, 'initialSocKwh'), at('state', 'storage', s.id, 'socKwh'), state.storage[s.id]);
      return { ...s, initialSocKwh: state.storage[s.id]?.socKwh ?? planned.storage.get(s.id)! };
    }),
    stores: (parent.stores ?? []).map((s, j) => {
      fromRequest(at('stores', j, 'initial'), at('state', 'stores', s.id, 'level'), state.stores[s.id]);
      const demand = series.storeDemandPerHour?.[s.id];
      fromRequest(at('stores', j, 'demandPerHour'), at('series', 'storeDemandPerHour', s.id), demand);
      return {
        ...s,
        initial: state.stores[s.id]?.level ?? planned.stores.get(s.id)!,
        demandPerHour: demand ?? remaining(s.demandPerHour, from),
        inflowPerHour: remaining(s.inflowPerHour, from),
      };
    }),
  };
  if (parent.siteLoad || series.siteLoadKw) {
    spec.siteLoad = { ...parent.siteLoad, kw: series.siteLoadKw ?? parent.siteLoad!.kw.slice(from) };
  }
  if (parent.grid) {
    spec.grid = {
      ...parent.grid,
      importPrice: series.importPrice ?? remaining(parent.grid.importPrice, from),
      exportPrice: series.exportPrice ?? remaining(parent.grid.exportPrice, from),
      ...(parent.grid.demandCharges
        ? {
            demandCharges: parent.grid.demandCharges.map((c, k) => {
              fromRequest(at('grid', 'demandCharges', k, 'existingPeakKw'), at('state', 'demandCharges', c.id, 'peakKw'), state.demandCharges[c.id]);
              return { ...c, existingPeakKw: state.demandCharges[c.id]?.peakKw ?? planned.demandPeaks.get(c.id)! };
            }),
          }
        : {}),
    };
  }
  if (parent.reserve) spec.reserve = { ...parent.reserve, upKw: series.reserveUpKw ?? remaining(parent.reserve.upKw, from) };

  return {
    spec,
    requestPointerOf(specPointer) {
      // The longest match wins: a unit's `initial/powerKw` before nothing else matching.
      const pair = pairs.filter(([sp]) => specPointer === sp || specPointer.startsWith(`${sp}/`)).sort((a, b) => b[0].length - a[0].length)[0];
      return pair ? pair[1] + specPointer.slice(pair[0].length) : null;
    },
  };
}
