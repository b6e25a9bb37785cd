import type { BuiltModel } from './build-window-model';
import { ON_THRESHOLD, OUTPUT_CLEANING_TOLERANCE } from './numerics';
import type { WindowPlan } from './plan-window';
import type { ScheduleBuffers } from './schedule-buffers';

/**
 * Copies the committed steps of a window's solution into the stitched schedule, unscaled to kW
 * and cleaned: values within the solver's tolerance of a bound become the bound (0 is 0, on/off
 * is 0/1), supply use absorbs the balance's rounding, and SOC is re-accumulated from the cleaned
 * charge and discharge so the storage equation holds exactly.
 */
export function extractWindowSchedule(plan: WindowPlan, built: BuiltModel, x: Float64Array, out: ScheduleBuffers): void {
  const { spec, window, scales, dh } = plan;
  const P = scales.powerKw;
  const tol = OUTPUT_CLEANING_TOLERANCE * P;
  const cols = built.columns;
  const value = (col: number, ub: number) => {
    if (col < 0) return 0;
    const v = x[col] * P;
    if (v <= tol) return 0;
    if (v >= ub - tol) return ub;
    return v;
  };

  for (let k = 0; k < window.commit; k++) {
    const t = window.from + k;
    const W = spec.supply.availableKw[t];
    const L = spec.siteLoad.kw[t];
    const imp = value(cols.imp[k], plan.grid.importUb[k]);
    const exp = value(cols.exp[k], plan.grid.exportUb[k]);
    const unserved = value(cols.unserved[k], L);
    out.imp[t] = imp;
    out.exp[t] = exp;
    out.unserved[t] = unserved;
    let produced = imp + unserved;
    let consumed = L + exp;

    spec.units.forEach((u, i) => {
      const c = cols.units[i];
      const on = c.on[k] >= 0 && x[c.on[k]] > ON_THRESHOLD ? 1 : 0;
      let p = on ? value(c.power[k], u.ratingKw) : 0;
      if (on && p < u.minStableKw && p >= u.minStableKw - tol) p = u.minStableKw;
      out.units[i].on[t] = on;
      out.units[i].power[t] = p;
      if (u.kind === 'generator') produced += p;
      else consumed += p;
    });

    spec.storage.forEach((s, i) => {
      const c = cols.storage[i];
      const charge = value(c.charge[k], s.maxChargeKw);
      const discharge = value(c.discharge[k], s.maxDischargeKw);
      const prev = t === 0 ? s.initialSocKwh : t === window.from ? plan.start.socKwh[i] : out.storage[i].soc[t - 1];
      let soc = prev + dh * (s.chargeEfficiency * charge - discharge / s.dischargeEfficiency);
      const socTol = tol * dh;
      if (Math.abs(soc - s.capacityKwh) <= socTol) soc = s.capacityKwh;
      if (Math.abs(soc - s.minSocKwh) <= socTol) soc = s.minSocKwh;
      if (s.finalSocKwh !== null && Math.abs(soc - s.finalSocKwh) <= socTol) soc = s.finalSocKwh;
      const fixedEnd = k === window.steps - 1 ? plan.storage[i].endSocFixedKwh : null;
      if (fixedEnd !== null && Math.abs(soc - fixedEnd) <= socTol) soc = fixedEnd;
      if (Math.abs(soc) <= socTol) soc = 0;
      out.storage[i].charge[t] = charge;
      out.storage[i].discharge[t] = discharge;
      out.storage[i].soc[t] = soc;
      produced += discharge;
      consumed += charge;
    });

    spec.stores.forEach((s, j) => {
      const c = cols.stores[j];
      const Q = plan.stores[j].scale;
      const storeTol = OUTPUT_CLEANING_TOLERANCE * Q;
      const rate = (col: number, ub: number) => {
        if (col < 0) return 0;
        const v = x[col] * Q;
        return v <= storeTol ? 0 : v >= ub - storeTol ? ub : v;
      };
      const shortfall = rate(c.shortfall[k], s.demandPerHour[t]);
      const spill = rate(c.spill[k], Infinity);
      let flow = shortfall - spill - s.demandPerHour[t] + s.inflowPerHour[t];
      spec.units.forEach((u, i) => {
        if (u.produces?.store === j) flow += u.produces.perKwh * out.units[i].power[t];
        if (u.consumes?.store === j) flow -= u.consumes.perKwh * out.units[i].power[t];
      });
      const prev = t === 0 ? s.initial : t === window.from ? plan.start.storeLevels[j] : out.stores[j].level[t - 1];
      // Re-accumulated from the cleaned flows so the store equation holds exactly.
      let level = (1 - s.lossPerHour * dh) * prev + dh * flow;
      const levelTol = storeTol * dh;
      for (const mark of [s.capacity, s.min, s.final, k === window.steps - 1 ? plan.stores[j].endFixed : null, 0]) {
        if (mark !== null && Math.abs(level - mark) <= levelTol) level = mark;
      }
      out.stores[j].level[t] = level;
      out.stores[j].shortfall[t] = shortfall;
      out.stores[j].spill[t] = spill;
    });

    // The balance holds within tolerance; let curtailment take up the remainder exactly.
    const used = consumed - produced;
    out.supplyUsed[t] = Math.abs(used) <= tol ? 0 : Math.abs(used - W) <= tol ? W : Math.min(W, Math.max(0, used));
  }
}
