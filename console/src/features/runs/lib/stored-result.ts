import type { Kpis, ModelReport, ObjectiveTerms, RunResult, Schedule } from '@gridwright/shared/run-result';

/** A result as the run page shows it: one stored before the v1.1 site model may not know its objective terms. */
export type ShownKpis = Omit<Kpis, 'objectiveTerms'> & { objectiveTerms: ObjectiveTerms | null };
export type ShownResult = Omit<RunResult, 'kpis'> & { kpis: ShownKpis | null };

type Stored<T> = { [K in keyof T]?: T[K] };

/**
 * Results are stored as the engine returned them, so a run solved before the v1.1 site model lacks
 * its fields. Read such a result as a site without those parts — no stores, no reserve, no known
 * marginal values, no cold starts — so the run page of an older run still shows everything it has.
 */
export function withSiteModelDefaults(result: RunResult): ShownResult {
  const schedule = result.schedule as Stored<Schedule> | null;
  const kpis = result.kpis as (Stored<Kpis> & Pick<Kpis, 'units'>) | null;
  const scale = result.model.scale as Stored<ModelReport['scale']> | undefined;
  return {
    ...result,
    schedule: schedule && {
      ...(schedule as Schedule),
      stores: schedule.stores ?? {},
      reserve: schedule.reserve ?? null,
      marginalValues: schedule.marginalValues ?? { energyPerKwh: (schedule.timestamps ?? []).map(() => null), stores: {} },
    },
    kpis: kpis && {
      ...(kpis as Kpis),
      reserveShortfallKwh: kpis.reserveShortfallKwh ?? 0,
      units: Object.fromEntries(Object.entries(kpis.units).map(([id, u]) => [id, { ...u, coldStarts: u.coldStarts ?? 0 }])),
      stores: kpis.stores ?? {},
      demandCharges: kpis.demandCharges ?? {},
      objectiveTerms: kpis.objectiveTerms ?? null,
    },
    model: { ...result.model, scale: scale && { powerKw: scale.powerKw ?? 1, money: scale.money ?? 1, stores: scale.stores ?? {}, demandPeakKw: scale.demandPeakKw ?? 1 } } as ModelReport,
  };
}
