import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ScheduleBuffers } from './schedule-buffers';

/** Relative size below which a computed shortfall is rounding in the setpoints, not a shortfall. */
const SHORTFALL_NOISE = 1e-6;

export interface ReserveHeld {
  /** Per unit that provides reserve, its headroom per step; null for the others. */
  units: (Float64Array | null)[];
  storage: (Float64Array | null)[];
  total: Float64Array;
  /** max(0, required − total) per step. */
  shortfall: Float64Array;
}

/**
 * The spinning reserve a schedule holds, read from its setpoints (SPEC §5): a generator's
 * rating·y − p, a flexible load's p − minStableKw·y, a battery's unused discharge plus the charge
 * it can stop, limited by the energy above its minimum at the step's end. What the solver chose to
 * count towards the requirement may be less; what is held is what a person can rely on.
 */
export function reserveHeld(spec: ResolvedSiteSpec, b: ScheduleBuffers): ReserveHeld {
  const T = spec.horizon.steps;
  const dh = spec.horizon.stepMinutes / 60;
  const total = new Float64Array(T);
  const units = spec.units.map((u, i) => {
    if (!u.providesReserve) return null;
    const r = new Float64Array(T);
    const { on, power } = b.units[i];
    for (let t = 0; t < T; t++) {
      r[t] = on[t] ? (u.kind === 'generator' ? u.ratingKw - power[t] : power[t] - u.minStableKw) : 0;
      if (r[t] < 0) r[t] = 0;
      total[t] += r[t];
    }
    return r;
  });
  const storage = spec.storage.map((s, i) => {
    if (!s.providesReserve) return null;
    const r = new Float64Array(T);
    const { charge, discharge, soc } = b.storage[i];
    for (let t = 0; t < T; t++) {
      const flow = s.maxDischargeKw - discharge[t] + charge[t];
      const energy = (s.dischargeEfficiency * (soc[t] - s.minSocKwh)) / dh;
      r[t] = Math.max(0, Math.min(flow, energy));
      total[t] += r[t];
    }
    return r;
  });
  const shortfall = new Float64Array(T);
  if (spec.reserve) {
    for (let t = 0; t < T; t++) {
      const short = spec.reserve.upKw[t] - total[t];
      // Below the solver's tolerance the requirement is met; float noise is not a shortfall.
      shortfall[t] = short > SHORTFALL_NOISE * Math.max(1, spec.reserve.upKw[t]) ? short : 0;
    }
  }
  return { units, storage, total, shortfall };
}
