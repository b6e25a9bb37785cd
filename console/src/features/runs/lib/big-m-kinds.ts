import type { ModelReport } from '@gridwright/shared/run-result';

/**
 * The kinds of big-M the engine reports, told apart by how its report names each place
 * (`api/src/engine/build-window-model.ts`: "<asset> capacity", "<unit> reserve headroom (rating)"…).
 * A place no kind matches is listed as "other" rather than hidden.
 */
export const bigMKinds = [
  { id: 'capacity', label: 'Unit on/off', pattern: / capacity$/, bounds: 'p ≤ M·y: the most power that can reach the unit at a step (its rating at most)' },
  { id: 'reserve', label: 'Reserve headroom', pattern: / reserve headroom \(rating\)$/, bounds: 'r ≤ rating·y − p: a generator holds reserve only while on' },
  { id: 'storage', label: 'Battery exclusivity', pattern: / charge\/discharge exclusivity \((charge|discharge) side\)$/, bounds: 'charge or discharge in one step, never both' },
  { id: 'grid', label: 'Grid exclusivity', pattern: /^grid import\/export exclusivity/, bounds: 'import or export in one step, never both' },
  { id: 'demand-peak', label: 'Demand-charge peak', pattern: / demand-charge peak \(import limit\)$/, bounds: 'the billed peak is at most the import limit' },
] as const;

export type BigMKindId = (typeof bigMKinds)[number]['id'] | 'other';

export interface BigMRow {
  where: string;
  value: number;
  kind: BigMKindId;
  kindLabel: string;
}

export function classifyBigM(entries: ModelReport['bigM']): BigMRow[] {
  return entries.map((e) => {
    const kind = bigMKinds.find((k) => k.pattern.test(e.where));
    return { ...e, kind: kind?.id ?? 'other', kindLabel: kind?.label ?? 'Other' };
  });
}

/** The kinds present, each with how many places use it, in the order of `bigMKinds`. */
export function bigMKindCounts(rows: BigMRow[]): { id: BigMKindId; label: string; bounds: string; count: number }[] {
  const known = bigMKinds.map((k) => ({ id: k.id as BigMKindId, label: k.label as string, bounds: k.bounds as string, count: rows.filter((r) => r.kind === k.id).length }));
  const other = rows.filter((r) => r.kind === 'other').length;
  return [...known, { id: 'other' as const, label: 'Other', bounds: 'a place this console does not know by name', count: other }].filter((k) => k.count > 0);
}
