import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { seriesPalette } from '@/lib/chart-colors';

/**
 * Ids in the order the spec lists the assets. A stored schedule's keys come back in the database's
 * order (PostgreSQL's jsonb sorts them), which means nothing to the person who wrote the spec; ids
 * the spec does not list keep their order after the ones it does.
 */
export function inSpecOrder(ids: string[], listed: { id: string }[] | undefined): string[] {
  const rank = new Map((listed ?? []).map((a, i) => [a.id, i]));
  return [...ids].sort((a, b) => (rank.get(a) ?? Infinity) - (rank.get(b) ?? Infinity));
}

/** One colour per unit and battery, the same in every chart: units first, then batteries, in spec order. */
export function assetColors(schedule: Schedule, spec: Pick<SiteSpec, 'units' | 'storage'> | undefined): Map<string, string> {
  const ids = [...inSpecOrder(Object.keys(schedule.units), spec?.units), ...inSpecOrder(Object.keys(schedule.storage), spec?.storage)];
  return new Map(ids.map((id, i) => [id, seriesPalette[i % seriesPalette.length]]));
}
