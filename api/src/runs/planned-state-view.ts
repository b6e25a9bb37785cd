import type { PlannedState } from '@gridwright/shared/revisions';
import type { AppContext } from '../context';
import { plannedStateAt } from './planned-state';
import { replanStep, resolveParent } from './replanning';
import { getRunSchedule } from './schedule-export';

/** The step a plan's present belongs to: the one under way now, held to the horizon. */
function currentStep(timestamps: string[], now: number): number {
  const started = timestamps.filter((ts) => Date.parse(ts) <= now).length;
  return Math.min(timestamps.length - 1, Math.max(0, started - 1));
}

/**
 * What a run's schedule says the site's state is at the start of a step (by default the step under
 * way now): what a re-plan from there assumes for anything it is not told, and what the console's
 * re-plan form starts from.
 */
export async function plannedStateView(ctx: AppContext, tenantId: string, id: string, at: string | undefined): Promise<PlannedState> {
  const { run, schedule } = await getRunSchedule(ctx, tenantId, id);
  const resolved = await resolveParent(ctx, run);
  const from =
    at === undefined
      ? currentStep(schedule.timestamps, Date.now())
      : replanStep(/^\d+$/.test(at) ? Number(at) : at, schedule, resolved.horizon.stepMinutes, '/query/at');
  const planned = plannedStateAt(resolved, schedule, from);
  const byId = <V, W>(map: Map<string, V>, view: (v: V) => W) => Object.fromEntries([...map].map(([k, v]) => [k, view(v)]));
  return {
    from,
    startsAt: schedule.timestamps[from],
    state: {
      storage: byId(planned.storage, (socKwh) => ({ socKwh })),
      stores: byId(planned.stores, (level) => ({ level })),
      units: byId(planned.units, (u) => ({ on: u.on, stepsInState: u.stepsInState, powerKw: u.powerKw })),
      demandCharges: byId(planned.demandPeaks, (peakKw) => ({ peakKw })),
    },
  };
}
