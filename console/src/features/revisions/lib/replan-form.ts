import type { PlannedState, ReplanRequest } from '@gridwright/shared/revisions';

/**
 * The re-plan form's values, as typed: one text per measured figure (so a half-typed number stays
 * as typed), keyed by the request pointer it becomes, and each unit's on/off.
 */
export interface ReplanFormValues {
  numbers: Record<string, string>;
  unitsOn: Record<string, boolean>;
  series: Record<FreshSeriesField, string>;
}

/** The fresh forecasts the form takes, one value per remaining step each. */
export const FRESH_SERIES = [
  { field: 'supplyKw', label: 'Available supply (kW)' },
  { field: 'siteLoadKw', label: 'Site load (kW)' },
  { field: 'importPrice', label: 'Import price (per kWh)' },
  { field: 'exportPrice', label: 'Export price (per kWh)' },
] as const;
export type FreshSeriesField = (typeof FRESH_SERIES)[number]['field'];

const esc = (id: string) => id.replace(/~/g, '~0').replace(/\//g, '~1');

/** Request pointers of the form's figures, so an API error lands beside its field. */
export const pointers = {
  soc: (id: string) => `/state/storage/${esc(id)}/socKwh`,
  level: (id: string) => `/state/stores/${esc(id)}/level`,
  stepsInState: (id: string) => `/state/units/${esc(id)}/stepsInState`,
  powerKw: (id: string) => `/state/units/${esc(id)}/powerKw`,
  peak: (id: string) => `/state/demandCharges/${esc(id)}/peakKw`,
  series: (field: FreshSeriesField) => `/series/${field}`,
};

/** Figures shown to the watt or better, without binary noise. */
const shown = (v: number) => String(Math.round(v * 1000) / 1000);

/** The form filled from the plan's state at the chosen step: what the operator corrects with what was measured. */
export function formFromPlan(planned: PlannedState): ReplanFormValues {
  const numbers: Record<string, string> = {};
  const unitsOn: Record<string, boolean> = {};
  for (const [id, s] of Object.entries(planned.state.storage)) numbers[pointers.soc(id)] = shown(s.socKwh);
  for (const [id, s] of Object.entries(planned.state.stores)) numbers[pointers.level(id)] = shown(s.level);
  for (const [id, u] of Object.entries(planned.state.units)) {
    unitsOn[id] = u.on;
    numbers[pointers.stepsInState(id)] = String(u.stepsInState);
    numbers[pointers.powerKw(id)] = u.powerKw === null ? '' : shown(u.powerKw);
  }
  for (const [id, c] of Object.entries(planned.state.demandCharges)) numbers[pointers.peak(id)] = shown(c.peakKw);
  return { numbers, unitsOn, series: { supplyKw: '', siteLoadKw: '', importPrice: '', exportPrice: '' } };
}

/** "12, 14.5\n16" → [12, 14.5, 16]; empty text → undefined (keep the parent's series). */
export function seriesFromText(text: string): number[] | undefined {
  const parts = text.split(/[\s,;]+/).filter(Boolean);
  return parts.length ? parts.map(Number) : undefined;
}

/** A figure as the API takes it: a number, or NaN for text that is none (the API names the field). */
const figure = (text: string | undefined) => (text === undefined || text.trim() === '' ? undefined : Number(text));

/**
 * The request the form sends: every figure it shows (the plan's where untouched), the output only
 * of a unit that is on, and fresh series where the operator pasted some.
 */
export function requestFromForm(from: number, planned: PlannedState, values: ReplanFormValues): ReplanRequest {
  const n = (pointer: string) => figure(values.numbers[pointer]);
  const state: ReplanRequest['state'] = { storage: {}, stores: {}, units: {}, demandCharges: {} };
  for (const id of Object.keys(planned.state.storage)) state.storage[id] = { socKwh: n(pointers.soc(id)) ?? NaN };
  for (const id of Object.keys(planned.state.stores)) state.stores[id] = { level: n(pointers.level(id)) ?? NaN };
  for (const id of Object.keys(planned.state.units)) {
    const on = values.unitsOn[id];
    const power = n(pointers.powerKw(id));
    state.units[id] = { on, stepsInState: n(pointers.stepsInState(id)), ...(on && power !== undefined ? { powerKw: power } : {}) };
  }
  for (const id of Object.keys(planned.state.demandCharges)) state.demandCharges[id] = { peakKw: n(pointers.peak(id)) ?? NaN };
  const series: ReplanRequest['series'] = {};
  for (const { field } of FRESH_SERIES) {
    const fresh = seriesFromText(values.series[field]);
    if (fresh) series[field] = fresh;
  }
  return { from, state, series };
}
