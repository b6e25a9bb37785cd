import { DateTime } from 'luxon';
import { In } from 'typeorm';
import { validateSiteSpec } from '@gridwright/shared/site-spec';
import { ROLE_KIND, type SeriesRole } from '@gridwright/shared/series-roles';
import type { AppContext } from '../context';
import { Series } from '../db/entities/series';
import { validationProblem, type ProblemFieldError } from '../lib/problem';
import { commonSteps, instantIn, seriesZone, type OfferedHorizon } from './series-horizon';

/**
 * A site spec built from uploaded series and the role each plays: the horizon from the steps they
 * share, `supply.seriesId` for the supply (the one field the contract lets name a series), the
 * values inline everywhere else. Built into `base` when one is given (the spec being edited: its
 * units, storage and settings stay), so a CSV export turns into a spec in one request.
 */
export interface RoleAssignment {
  seriesId: string;
  role: SeriesRole;
  /** storeDemand only: the `stores[].id` of `base` whose demand the series is. */
  storeId?: string;
}

export interface SpecDraftRequest {
  assignments: RoleAssignment[];
  /** A window of the series' common steps; default: all of them. */
  horizon?: { start?: string; steps?: number };
  base?: Record<string, unknown>;
}

export interface SpecDraft {
  spec: Record<string, unknown>;
  /** What the draft changed or left for a person to decide, each at the field it concerns. */
  notes: ProblemFieldError[];
  /** The site-spec check of the draft as it stands (e.g. a per-step array of `base` of another length). */
  problems: ProblemFieldError[];
}

type Json = Record<string, unknown>;
const MINUTE = 60_000;
const isObject = (v: unknown): v is Json => typeof v === 'object' && v !== null && !Array.isArray(v);
const objectAt = (v: unknown): Json => (isObject(v) ? v : {});

function checkAssignments(request: SpecDraftRequest, found: Map<string, Series>): ProblemFieldError[] {
  const errors: ProblemFieldError[] = [];
  const storeIds = new Set((Array.isArray(request.base?.stores) ? request.base.stores : []).map((s) => objectAt(s).id));
  const firstOf = new Map<string, number>();
  request.assignments.forEach((a, i) => {
    const at = `/assignments/${i}`;
    const series = found.get(a.seriesId);
    if (!series) errors.push({ pointer: `${at}/seriesId`, message: `no series "${a.seriesId}" in this tenant` });
    else if (series.kind !== ROLE_KIND[a.role]) {
      errors.push({ pointer: `${at}/role`, message: `${a.role} takes a ${ROLE_KIND[a.role]} series; "${series.name}" is a ${series.kind} (${series.unit})` });
    }
    if (a.role === 'storeDemand' && a.storeId === undefined) errors.push({ pointer: `${at}/storeId`, message: 'storeDemand names the store whose demand the series is' });
    else if (a.role !== 'storeDemand' && a.storeId !== undefined) errors.push({ pointer: `${at}/storeId`, message: `only storeDemand names a store, not ${a.role}` });
    else if (a.storeId !== undefined && !storeIds.has(a.storeId)) errors.push({ pointer: `${at}/storeId`, message: `no store "${a.storeId}" in base.stores` });
    const key = `${a.role}:${a.storeId ?? ''}`;
    const first = firstOf.get(key);
    if (first !== undefined) errors.push({ pointer: `${at}/role`, message: `${a.role}${a.storeId ? ` of ${a.storeId}` : ''} is already assigned at /assignments/${first}` });
    else firstOf.set(key, i);
  });
  return errors;
}

/** The window of the series' common steps the request asks for, or a refusal naming the field. */
function chooseWindow(series: Series[], asked: SpecDraftRequest['horizon']): { startMs: number; stepMinutes: number; steps: number } {
  const stepped = series.findIndex((s) => s.stepMinutes !== series[0].stepMinutes);
  if (stepped > 0) {
    throw validationProblem([
      { pointer: `/assignments/${stepped}/seriesId`, message: `has ${series[stepped].stepMinutes}-minute steps; the series at /assignments/0 has ${series[0].stepMinutes}-minute steps` },
    ]);
  }
  const common = commonSteps(series);
  if (!common) throw validationProblem([{ pointer: '/assignments', message: 'the series share no step: their time ranges do not overlap' }]);
  const stepMs = common.stepMinutes * MINUTE;
  const endMs = common.startMs + common.steps * stepMs;
  let startMs = common.startMs;
  if (asked?.start !== undefined) {
    startMs = DateTime.fromISO(asked.start, { setZone: true }).toMillis();
    const zone = seriesZone(series[0]);
    if (!Number.isFinite(startMs) || startMs < common.startMs || startMs >= endMs || (startMs - common.startMs) % stepMs !== 0) {
      throw validationProblem([
        {
          pointer: '/horizon/start',
          message: `must be the start of a step the series all cover: ${instantIn(common.startMs, zone)} to ${instantIn(endMs - stepMs, zone)}, every ${common.stepMinutes} minutes`,
        },
      ]);
    }
  }
  const available = Math.round((endMs - startMs) / stepMs);
  if (asked?.steps !== undefined && asked.steps > available) {
    throw validationProblem([{ pointer: '/horizon/steps', message: `${asked.steps} exceeds the ${available} steps the series cover from the start` }]);
  }
  return { startMs, stepMinutes: common.stepMinutes, steps: asked?.steps ?? available };
}

/**
 * The horizon's zone: the one the files were read in; else the base's own when it has the files'
 * offset at the start (so its demand-charge windows keep their meaning), else none.
 */
function horizonFor(window: { startMs: number; stepMinutes: number; steps: number }, series: Series[], base: Json, notes: ProblemFieldError[]): OfferedHorizon {
  const zoned = series.find((s) => s.timeZone)?.timeZone;
  const baseZone = objectAt(base.horizon).timeZone;
  let timeZone = zoned ?? undefined;
  if (!timeZone && typeof baseZone === 'string') {
    const offsetThere = DateTime.fromMillis(window.startMs, { zone: baseZone });
    if (offsetThere.isValid && offsetThere.toFormat('ZZ') === series[0].startOffset) timeZone = baseZone;
    else notes.push({ pointer: '/horizon/timeZone', message: `removed "${baseZone}": the file's timestamps carry the offset ${series[0].startOffset}, which that zone does not have at the start` });
  }
  const start = instantIn(window.startMs, timeZone ?? seriesZone(series[0]));
  return { start, stepMinutes: window.stepMinutes, steps: window.steps, ...(timeZone ? { timeZone } : {}) };
}

function placeSeries(spec: Json, a: RoleAssignment, series: Series, values: number[], notes: ProblemFieldError[]) {
  switch (a.role) {
    case 'supply':
      spec.supply = { seriesId: series.id };
      return;
    case 'siteLoad':
      spec.siteLoad = { ...objectAt(spec.siteLoad), kw: values };
      return;
    case 'reserve':
      spec.reserve = { ...objectAt(spec.reserve), upKw: values };
      return;
    case 'importPrice':
    case 'exportPrice': {
      const grid = { ...objectAt(spec.grid), [a.role]: values };
      spec.grid = grid;
      const limit = a.role === 'importPrice' ? 'importLimitKw' : 'exportLimitKw';
      if (!grid[limit]) {
        notes.push({ pointer: `/grid/${limit}`, message: `is 0 (the default), so nothing is ${a.role === 'importPrice' ? 'imported' : 'exported'} at these prices: set the connection's limit` });
      }
      return;
    }
    case 'storeDemand': {
      const stores = (spec.stores as unknown[]).map(objectAt);
      const i = stores.findIndex((s) => s.id === a.storeId);
      stores[i] = { ...stores[i], demandPerHour: values };
      spec.stores = stores;
    }
  }
}

export async function draftSpecFromSeries(ctx: AppContext, tenantId: string, request: SpecDraftRequest): Promise<SpecDraft> {
  const ids = [...new Set(request.assignments.map((a) => a.seriesId))].filter((id) => /^ser_[0-9a-f]{32}$/.test(id));
  const found = new Map((ids.length ? await ctx.db.manager.findBy(Series, { tenantId, id: In(ids) }) : []).map((s) => [s.id, s]));
  const errors = checkAssignments(request, found);
  if (errors.length) throw validationProblem(errors);

  const series = request.assignments.map((a) => found.get(a.seriesId)!);
  const window = chooseWindow(series, request.horizon);
  const base = isObject(request.base) ? structuredClone(request.base) : {};
  const notes: ProblemFieldError[] = [];
  // The horizon leads, as in every spec; a base keeps the order of its own fields.
  const spec: Json = { horizon: null, ...base };
  spec.horizon = horizonFor(window, series, base, notes);
  request.assignments.forEach((a, i) => {
    const first = Math.round((window.startMs - series[i].start.getTime()) / (window.stepMinutes * MINUTE));
    placeSeries(spec, a, series[i], series[i].values.slice(first, first + window.steps), notes);
  });
  const checked = validateSiteSpec(spec);
  return { spec, notes, problems: checked.ok ? [] : checked.errors };
}
