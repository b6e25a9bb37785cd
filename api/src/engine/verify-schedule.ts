/**
 * The independent verifier: checks a schedule against SPEC.md §2 from the schedule alone.
 *
 * It shares no code with the model builder on purpose: it reads the spec and the returned
 * kW/kWh series and recomputes every rule (balance, bounds, curtailment, unserved load, unit
 * bounds, starts and minimum up/down including the initial state, SOC dynamics and limits, the
 * final SOC target, exclusivity) and the objective. A bug in the builder therefore shows up as
 * a violation here instead of being confirmed by the same mistake. Pure, O(steps · assets).
 * Tolerances: see verify-tolerance.ts.
 */
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import { Tolerance } from './verify-tolerance';
import { findRunViolations } from './verify-unit-runs';
import { fmt, seriesOk, ViolationList } from './verify-violations';
import { verifySiteExtensions } from './verify-site-extensions';
import { verifyRamps } from './verify-ramps';

export type { ScheduleViolation } from './verify-violations';

export { MAX_REPORTED_VIOLATIONS } from './verify-violations';

import type { ScheduleViolation } from './verify-violations';

export interface VerificationResult {
  ok: boolean;
  violations: ScheduleViolation[];
  /** SPEC.md §2 objective recomputed from the schedule (maximised). */
  objective: number;
}

/** The largest power or energy figure in the spec: the scale of the absolute tolerance. */
function siteScale(spec: ResolvedSiteSpec): number {
  let m = 0;
  for (const w of spec.supply.availableKw) m = Math.max(m, Math.abs(w));
  for (const l of spec.siteLoad.kw) m = Math.max(m, Math.abs(l));
  m = Math.max(m, spec.grid.importLimitKw, spec.grid.exportLimitKw);
  for (const u of spec.units) m = Math.max(m, u.ratingKw);
  for (const s of spec.storage) m = Math.max(m, s.capacityKwh, s.maxChargeKw, s.maxDischargeKw);
  return m;
}

/**
 * The money per hour of a unit at `kw` by its curve, walking slices upwards from 0 kW: each
 * slice's price on the part of `kw` that lies between its lower end and its `upToKw`.
 */
function sliceFilledPrice(curve: readonly { upToKw: number; perKwh: number }[], kw: number): number {
  let money = 0;
  let lower = 0;
  for (const slice of curve) {
    if (kw > lower) money += slice.perKwh * (Math.min(kw, slice.upToKw) - lower);
    lower = slice.upToKw;
  }
  return money;
}

export function verifySchedule(spec: ResolvedSiteSpec, schedule: Schedule): VerificationResult {
  const list = new ViolationList();
  const T = spec.horizon.steps;
  const dh = spec.horizon.stepMinutes / 60;
  const tol = new Tolerance(siteScale(spec));

  const W = spec.supply.availableKw;
  const L = spec.siteLoad.kw;
  const penalty = spec.siteLoad.unservedPenaltyPerKwh;
  const loadIsHard = penalty === null;

  const timestamps = schedule.timestamps;
  if (!Array.isArray(timestamps) || timestamps.length !== T) {
    list.add('length', `timestamps has ${timestamps?.length ?? 0} entries, the horizon has ${T} steps`, undefined, '/horizon/steps');
  } else {
    const start = Date.parse(spec.horizon.start);
    const stepMs = spec.horizon.stepMinutes * 60_000;
    for (let t = 0; t < T; t++) {
      if (Date.parse(timestamps[t]) !== start + t * stepMs) {
        list.add('timestamp', `timestamp of step ${t} is ${timestamps[t]}, expected start + ${t}·${spec.horizon.stepMinutes} min`, t, '/horizon/start');
        break;
      }
    }
  }

  const g = seriesOk(list, schedule.supplyUsedKw, T, '/supply/availableKw', 'supplyUsedKw') ? schedule.supplyUsedKw : null;
  const curt = seriesOk(list, schedule.curtailedKw, T, '/supply/availableKw', 'curtailedKw') ? schedule.curtailedKw : null;
  const u = seriesOk(list, schedule.unservedKw, T, '/siteLoad/kw', 'unservedKw') ? schedule.unservedKw : null;

  const imp = seriesOk(list, schedule.grid?.importKw, T, '/grid/importLimitKw', 'grid.importKw') ? schedule.grid.importKw : null;
  const exp = seriesOk(list, schedule.grid?.exportKw, T, '/grid/exportLimitKw', 'grid.exportKw') ? schedule.grid.exportKw : null;

  let objective = 0;
  // Net power each step: sources minus sinks; every term is added as it is read so the
  // balance needs one pass per asset. absSum is the magnitude for the balance tolerance.
  const net = new Float64Array(T);
  const absSum = new Float64Array(T);
  let balanceComplete = g !== null && u !== null && imp !== null && exp !== null;

  for (let t = 0; t < T; t++) {
    net[t] -= L[t];
    absSum[t] += Math.abs(L[t]);
  }

  if (g) {
    for (let t = 0; t < T; t++) {
      if (g[t] < -tol.of(W[t]) || !tol.le(g[t], W[t])) {
        list.add('supply-bounds', `supply used ${fmt(g[t])} kW at step ${t} is outside [0, ${fmt(W[t])}] (available)`, t, `/supply/availableKw/${t}`);
      }
      net[t] += g[t];
      absSum[t] += Math.abs(g[t]);
      if (curt && !tol.eq(curt[t], W[t] - g[t])) {
        list.add('curtailment', `curtailed ${fmt(curt[t])} kW at step ${t} differs from available − used = ${fmt(W[t] - g[t])} kW`, t, `/supply/availableKw/${t}`);
      }
    }
  }

  if (u) {
    for (let t = 0; t < T; t++) {
      if (loadIsHard) {
        if (Math.abs(u[t]) > tol.of(L[t])) {
          list.add('unserved-hard', `unserved load ${fmt(u[t])} kW at step ${t}, but the site load is hard (no unservedPenaltyPerKwh)`, t, `/siteLoad/kw/${t}`);
        }
      } else if (u[t] < -tol.of(L[t]) || !tol.le(u[t], L[t])) {
        list.add('unserved-bounds', `unserved load ${fmt(u[t])} kW at step ${t} is outside [0, ${fmt(L[t])}] (the load)`, t, `/siteLoad/kw/${t}`);
      }
      net[t] += u[t];
      absSum[t] += Math.abs(u[t]);
      if (penalty !== null) objective -= dh * penalty * u[t];
    }
  }

  if (imp && exp) {
    const grid = spec.grid;
    const impLimit = grid.importLimitKw;
    const expLimit = grid.exportLimitKw;
    // An island has no /grid in the spec; its flows are reported against the spec root.
    const impPointer = grid.island ? '' : '/grid/importLimitKw';
    const expPointer = grid.island ? '' : '/grid/exportLimitKw';
    const island = grid.island ? ' (island: the spec has no grid)' : '';
    for (let t = 0; t < T; t++) {
      if (imp[t] < -tol.of(impLimit) || !tol.le(imp[t], impLimit)) {
        list.add('import-limit', `import ${fmt(imp[t])} kW at step ${t} is outside [0, ${fmt(impLimit)}]${island}`, t, impPointer);
      }
      if (exp[t] < -tol.of(expLimit) || !tol.le(exp[t], expLimit)) {
        list.add('export-limit', `export ${fmt(exp[t])} kW at step ${t} is outside [0, ${fmt(expLimit)}]${island}`, t, expPointer);
      }
      if (tol.positive(imp[t], impLimit) && tol.positive(exp[t], expLimit)) {
        list.add('grid-exclusive', `grid imports ${fmt(imp[t])} kW and exports ${fmt(exp[t])} kW in the same step ${t}`, t, '/grid');
      }
      net[t] += imp[t] - exp[t];
      absSum[t] += Math.abs(imp[t]) + Math.abs(exp[t]);
      objective += dh * (grid.exportPrice[t] * exp[t] - grid.importPrice[t] * imp[t]);
    }
  }

  spec.units.forEach((unit, i) => {
    const base = `/units/${i}`;
    const s = schedule.units?.[unit.id];
    if (!s) {
      list.add('missing-series', `schedule has no entry for unit ${unit.id}`, undefined, `${base}/id`);
      balanceComplete = false;
      return;
    }
    const onOk = seriesOk(list, s.on, T, base, `units.${unit.id}.on`);
    const pOk = seriesOk(list, s.powerKw, T, `${base}/ratingKw`, `units.${unit.id}.powerKw`);
    if (!pOk) balanceComplete = false;
    if (!onOk || !pOk) return;
    const on = s.on;
    const p = s.powerKw;
    const sign = unit.kind === 'generator' ? 1 : -1;
    const minStable = unit.minStableKw;
    let binary = true;
    for (let t = 0; t < T; t++) {
      net[t] += sign * p[t];
      absSum[t] += Math.abs(p[t]);
      objective += dh * (unit.kind === 'generator' ? -1 : 1) * sliceFilledPrice(unit.curve, p[t]);
      if (on[t] !== 0 && on[t] !== 1) {
        list.add('unit-on-binary', `unit ${unit.id} on-state at step ${t} is ${on[t]}, not 0 or 1`, t, base);
        binary = false;
        continue;
      }
      objective -= dh * unit.noLoadCostPerHour * on[t];
      if (p[t] < minStable * on[t] - tol.of(minStable) || !tol.le(p[t], unit.ratingKw * on[t])) {
        const pointer = on[t] === 1 && p[t] < minStable ? `${base}/minStableKw` : `${base}/ratingKw`;
        list.add('unit-power-bounds', `unit ${unit.id} at step ${t}: ${fmt(p[t])} kW while ${on[t] ? 'on' : 'off'}; allowed ${on[t] ? `[${fmt(minStable)}, ${fmt(unit.ratingKw)}]` : '0'}`, t, pointer);
      }
    }
    if (!binary) return;

    const initialOn = unit.initial.on;
    const initialSteps = unit.initial.stepsInState;
    // Steps off before each start, the time off before the horizon included (an initially
    // off unit was on before its stepsInState; "forever" is resolved to a long enough count).
    const { hot, cold, coldAfterSteps } = unit.startupCost;
    let prev = initialOn ? 1 : 0;
    let offSteps = initialOn ? 0 : initialSteps;
    for (let t = 0; t < T; t++) {
      if (on[t] === 1 && prev === 0) objective -= coldAfterSteps !== null && offSteps > coldAfterSteps ? cold : hot;
      offSteps = on[t] === 1 ? 0 : offSteps + 1;
      prev = on[t];
    }
    verifyRamps(list, tol, spec, i, on, p);

    for (const r of findRunViolations(on, initialOn, initialSteps, unit.minUpSteps, unit.minDownSteps)) {
      const what = r.kind === 'min-up' ? 'on' : 'off';
      const since = r.initial ? `since before the horizon (initial.stepsInState counts, total ${r.length})` : `from step ${r.fromStep}`;
      list.add(
        r.kind,
        `unit ${unit.id} stays ${what} only ${r.length} step(s) ${since} and changes at step ${r.changedAt}; ${r.kind === 'min-up' ? 'minUpSteps' : 'minDownSteps'} is ${r.required}`,
        r.changedAt,
        r.initial ? `${base}/initial` : `${base}/${r.kind === 'min-up' ? 'minUpSteps' : 'minDownSteps'}`,
      );
    }
  });

  spec.storage.forEach((st, j) => {
    const base = `/storage/${j}`;
    const s = schedule.storage?.[st.id];
    if (!s) {
      list.add('missing-series', `schedule has no entry for storage ${st.id}`, undefined, `${base}/id`);
      balanceComplete = false;
      return;
    }
    const cOk = seriesOk(list, s.chargeKw, T, `${base}/maxChargeKw`, `storage.${st.id}.chargeKw`);
    const dOk = seriesOk(list, s.dischargeKw, T, `${base}/maxDischargeKw`, `storage.${st.id}.dischargeKw`);
    const socOk = seriesOk(list, s.socKwh, T, `${base}/capacityKwh`, `storage.${st.id}.socKwh`);
    if (!cOk || !dOk) {
      balanceComplete = false;
      return;
    }
    const c = s.chargeKw;
    const d = s.dischargeKw;
    const etaC = st.chargeEfficiency;
    const etaD = st.dischargeEfficiency;
    const minSoc = st.minSocKwh;
    for (let t = 0; t < T; t++) {
      if (c[t] < -tol.of(st.maxChargeKw) || !tol.le(c[t], st.maxChargeKw)) {
        list.add('charge-bounds', `storage ${st.id} charges ${fmt(c[t])} kW at step ${t}; allowed [0, ${fmt(st.maxChargeKw)}]`, t, `${base}/maxChargeKw`);
      }
      if (d[t] < -tol.of(st.maxDischargeKw) || !tol.le(d[t], st.maxDischargeKw)) {
        list.add('discharge-bounds', `storage ${st.id} discharges ${fmt(d[t])} kW at step ${t}; allowed [0, ${fmt(st.maxDischargeKw)}]`, t, `${base}/maxDischargeKw`);
      }
      if (tol.positive(c[t], st.maxChargeKw) && tol.positive(d[t], st.maxDischargeKw)) {
        list.add('storage-exclusive', `storage ${st.id} charges ${fmt(c[t])} kW and discharges ${fmt(d[t])} kW in the same step ${t}`, t, base);
      }
      net[t] += d[t] - c[t];
      absSum[t] += Math.abs(c[t]) + Math.abs(d[t]);
      objective -= dh * st.cycleCostPerKwh * d[t];
    }
    if (!socOk) return;
    const soc = s.socKwh;
    let prev = st.initialSocKwh;
    for (let t = 0; t < T; t++) {
      const expected = prev + dh * (etaC * c[t] - d[t] / etaD);
      if (!tol.eq(soc[t], expected)) {
        list.add('soc-dynamics', `storage ${st.id} SOC at step ${t} is ${fmt(soc[t])} kWh; previous SOC and flows give ${fmt(expected)} kWh`, t, t === 0 ? `${base}/initialSocKwh` : base);
      }
      if (soc[t] < minSoc - tol.of(minSoc, st.capacityKwh)) {
        list.add('soc-bounds', `storage ${st.id} SOC ${fmt(soc[t])} kWh at step ${t} is below minSocKwh ${fmt(minSoc)}`, t, `${base}/minSocKwh`);
      }
      if (!tol.le(soc[t], st.capacityKwh)) {
        list.add('soc-bounds', `storage ${st.id} SOC ${fmt(soc[t])} kWh at step ${t} is above capacityKwh ${fmt(st.capacityKwh)}`, t, `${base}/capacityKwh`);
      }
      // The recorded SOC (not the recomputed one) carries on, so one bad step is reported once.
      prev = soc[t];
    }
    if (st.finalSocKwh !== null && T > 0 && soc[T - 1] < st.finalSocKwh - tol.of(st.finalSocKwh, st.capacityKwh)) {
      list.add('final-soc', `storage ${st.id} ends at ${fmt(soc[T - 1])} kWh, below finalSocKwh ${fmt(st.finalSocKwh)}`, T - 1, `${base}/finalSocKwh`);
    }
  });

  if (balanceComplete) {
    for (let t = 0; t < T; t++) {
      if (Math.abs(net[t]) > tol.of(absSum[t])) {
        list.add('balance', `power balance off by ${fmt(net[t])} kW at step ${t} (sources − sinks)`, t, `/supply/availableKw/${t}`);
      }
    }
  }

  objective += verifySiteExtensions(list, spec, schedule);

  const violations = list.finish();
  return { ok: violations.length === 0, violations, objective };
}
