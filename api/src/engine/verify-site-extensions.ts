/**
 * The verifier's checks of SPEC §5's site-wide rules, from the schedule alone: spinning reserve,
 * demand charges, batteries that charge from supply only, and product stores. Returns their part
 * of the objective (penalties and demand charges, signed). Shares no code with the model builder.
 */
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import { isoOffsetMinutes, localClock } from './verify-local-time';
import { Tolerance } from './verify-tolerance';
import { fmt, seriesOk, type ViolationList } from './verify-violations';

export function verifySiteExtensions(list: ViolationList, spec: ResolvedSiteSpec, schedule: Schedule): number {
  const scale = Math.max(
    1,
    ...spec.units.map((u) => u.ratingKw),
    ...spec.storage.map((s) => Math.max(s.capacityKwh, s.maxChargeKw, s.maxDischargeKw)),
    spec.grid.importLimitKw,
    ...(spec.reserve?.upKw ?? []),
  );
  const tol = new Tolerance(scale);
  return verifyReserve(list, tol, spec, schedule) + verifyDemandCharges(list, spec, schedule) + verifySupplyOnly(list, tol, spec, schedule) + verifyStores(list, spec, schedule);
}

const complete = (schedule: Schedule, spec: ResolvedSiteSpec) =>
  spec.units.every((u) => schedule.units?.[u.id]?.on?.length === spec.horizon.steps && schedule.units[u.id].powerKw?.length === spec.horizon.steps) &&
  spec.storage.every((s) => ['chargeKw', 'dischargeKw', 'socKwh'].every((k) => (schedule.storage?.[s.id] as unknown as Record<string, number[]>)?.[k]?.length === spec.horizon.steps));

/**
 * Spinning reserve (SPEC §5): what each provider holds — a generator rating·on − p, a flexible load
 * p − minStable·on, a battery min(maxDischarge − d + c, ηd·(soc − minSoc)/Δh) — summed against the
 * requirement. A hard requirement may not fall short; a soft one pays its penalty on the shortfall.
 */
function verifyReserve(list: ViolationList, tol: Tolerance, spec: ResolvedSiteSpec, schedule: Schedule): number {
  const reserve = spec.reserve;
  if (!reserve || !complete(schedule, spec)) return 0;
  const T = spec.horizon.steps;
  const dh = spec.horizon.stepMinutes / 60;
  const held = new Float64Array(T);
  for (const u of spec.units) {
    if (!u.providesReserve) continue;
    const { on, powerKw } = schedule.units[u.id];
    for (let t = 0; t < T; t++) {
      if (on[t] !== 1) continue;
      held[t] += Math.max(0, u.kind === 'generator' ? u.ratingKw - powerKw[t] : powerKw[t] - u.minStableKw);
    }
  }
  for (const s of spec.storage) {
    if (!s.providesReserve) continue;
    const { chargeKw, dischargeKw, socKwh } = schedule.storage[s.id];
    for (let t = 0; t < T; t++) {
      const byPower = s.maxDischargeKw - dischargeKw[t] + chargeKw[t];
      const byEnergy = (s.dischargeEfficiency * (socKwh[t] - s.minSocKwh)) / dh;
      held[t] += Math.max(0, Math.min(byPower, byEnergy));
    }
  }
  let objective = 0;
  const reported = schedule.reserve;
  if (!reported || !seriesOk(list, reported.providedKw, T, '/reserve', 'reserve.providedKw') || !seriesOk(list, reported.shortfallKw, T, '/reserve', 'reserve.shortfallKw')) {
    if (!reported) list.add('missing-series', 'schedule has no reserve block although the spec requires reserve', undefined, '/reserve');
    return 0;
  }
  for (let t = 0; t < T; t++) {
    const short = Math.max(0, reserve.upKw[t] - held[t]);
    if (!tol.eq(reported.providedKw[t], held[t])) {
      list.add('reserve-reported', `reserve.providedKw at step ${t} is ${fmt(reported.providedKw[t])} kW; the setpoints hold ${fmt(held[t])} kW`, t, '/reserve');
    }
    if (reserve.shortfallPenaltyPerKwh === null) {
      if (short > tol.of(reserve.upKw[t])) {
        list.add('reserve-short', `spinning reserve ${fmt(held[t])} kW at step ${t} is below the required ${fmt(reserve.upKw[t])} kW, and the requirement is hard`, t, `/reserve/upKw`);
      }
    } else {
      objective -= dh * reserve.shortfallPenaltyPerKwh * (short > tol.of(reserve.upKw[t]) ? short : 0);
    }
  }
  return objective;
}

/**
 * Demand charges (SPEC §5): each step whose local start time lies in the window (from inclusive,
 * to exclusive, wrapping past midnight when from > to, empty when equal, the weekday of the step's
 * own local date) sets the peak with its import; the charge is price × (peak − existingPeakKw),
 * the peak never below existingPeakKw.
 */
function verifyDemandCharges(list: ViolationList, spec: ResolvedSiteSpec, schedule: Schedule): number {
  const charges = spec.grid.demandCharges;
  const imports = schedule.grid?.importKw;
  if (!charges.length || !Array.isArray(imports) || imports.length !== spec.horizon.steps) return 0;
  const { start, stepMinutes, steps, timeZone } = spec.horizon;
  const clock = localClock(timeZone, isoOffsetMinutes(start));
  const t0 = Date.parse(start);
  const local = Array.from({ length: steps }, (_, t) => clock(t0 + t * stepMinutes * 60_000));
  const minutes = (hhmm: string) => 60 * Number(hhmm.slice(0, 2)) + Number(hhmm.slice(3));
  let objective = 0;
  for (const charge of charges) {
    const from = minutes(charge.window.from);
    const to = minutes(charge.window.to);
    let peak = charge.existingPeakKw;
    for (let t = 0; t < steps; t++) {
      const { weekday, minute } = local[t];
      const inTime = from < to ? minute >= from && minute < to : from > to ? minute >= from || minute < to : false;
      if (inTime && charge.window.daysOfWeek.includes(weekday)) peak = Math.max(peak, imports[t]);
    }
    objective -= charge.pricePerKw * (peak - charge.existingPeakKw);
  }
  return objective;
}

/** A battery flagged chargeFromSupplyOnly never charges from the grid: imp ≤ (L − u) + Σ flexible p + Σ unflagged charge. */
function verifySupplyOnly(list: ViolationList, tol: Tolerance, spec: ResolvedSiteSpec, schedule: Schedule): number {
  const flagged = spec.storage.findIndex((s) => s.chargeFromSupplyOnly);
  if (flagged < 0 || !complete(schedule, spec)) return 0;
  const imports = schedule.grid?.importKw;
  const unserved = schedule.unservedKw;
  if (!Array.isArray(imports) || !Array.isArray(unserved)) return 0;
  for (let t = 0; t < spec.horizon.steps; t++) {
    let allowed = spec.siteLoad.kw[t] - unserved[t];
    for (const u of spec.units) if (u.kind === 'flexible-load') allowed += schedule.units[u.id].powerKw[t];
    for (const s of spec.storage) if (!s.chargeFromSupplyOnly) allowed += schedule.storage[s.id].chargeKw[t];
    if (!tol.le(imports[t], allowed)) {
      list.add(
        'supply-only-charging',
        `import ${fmt(imports[t])} kW at step ${t} exceeds what the site load, flexible loads and grid-charged batteries take (${fmt(allowed)} kW): a battery that charges from supply only is charging from the grid`,
        t,
        `/storage/${flagged}/chargeFromSupplyOnly`,
      );
    }
  }
  return 0;
}

/**
 * Product stores (SPEC §5): level_t = (1 − loss·Δh)·level_{t−1} + Δh·(produced − consumed + inflow − demand
 * + shortfall − spill), within [min, capacity], at least `final` at the end; shortfall within
 * [0, demand] and 0 when the demand is hard; spill 0 unless allowed. Shortfall pays its penalty.
 */
function verifyStores(list: ViolationList, spec: ResolvedSiteSpec, schedule: Schedule): number {
  const T = spec.horizon.steps;
  const dh = spec.horizon.stepMinutes / 60;
  let objective = 0;
  spec.stores.forEach((s, j) => {
    const base = `/stores/${j}`;
    const entry = schedule.stores?.[s.id];
    if (!entry) {
      list.add('missing-series', `schedule has no entry for store ${s.id}`, undefined, `${base}/id`);
      return;
    }
    const ok =
      seriesOk(list, entry.level, T, `${base}/capacity`, `stores.${s.id}.level`) &&
      seriesOk(list, entry.shortfall, T, `${base}/demandPerHour`, `stores.${s.id}.shortfall`) &&
      seriesOk(list, entry.spill, T, base, `stores.${s.id}.spill`);
    if (!ok || !complete(schedule, spec)) return;
    let scale = Math.max(s.capacity, ...s.demandPerHour.map((d) => d * dh), ...s.inflowPerHour.map((d) => d * dh));
    for (const u of spec.units) for (const link of [u.produces, u.consumes]) if (link?.store === j) scale = Math.max(scale, link.perKwh * u.ratingKw * dh);
    const tol = new Tolerance(scale);
    const keep = 1 - s.lossPerHour * dh;
    let prev = s.initial;
    for (let t = 0; t < T; t++) {
      const short = entry.shortfall[t];
      const spill = entry.spill[t];
      const demand = s.demandPerHour[t];
      if (s.shortfallPenaltyPerUnit === null ? Math.abs(short) > tol.of(demand) : short < -tol.of(demand) || !tol.le(short, demand)) {
        list.add('store-shortfall', `store ${s.id} is short ${fmt(short)} per hour at step ${t}; allowed ${s.shortfallPenaltyPerUnit === null ? '0 (the demand is hard)' : `[0, ${fmt(demand)}]`}`, t, `${base}/demandPerHour`);
      }
      if (s.spillAllowed ? spill < -tol.of(0) : Math.abs(spill) > tol.of(0)) {
        list.add('store-spill', `store ${s.id} spills ${fmt(spill)} per hour at step ${t}${s.spillAllowed ? '' : ', but spillAllowed is false'}`, t, `${base}/spillAllowed`);
      }
      let made = 0;
      for (const u of spec.units) {
        const p = schedule.units[u.id].powerKw[t];
        if (u.produces?.store === j) made += u.produces.perKwh * p;
        if (u.consumes?.store === j) made -= u.consumes.perKwh * p;
      }
      const expected = keep * prev + dh * (made + s.inflowPerHour[t] - demand + short - spill);
      const level = entry.level[t];
      if (!tol.eq(level, expected)) {
        list.add('store-dynamics', `store ${s.id} level at step ${t} is ${fmt(level)}; the previous level and the flows give ${fmt(expected)}`, t, t === 0 ? `${base}/initial` : base);
      }
      if (level < s.min - tol.of(s.min, s.capacity)) list.add('store-bounds', `store ${s.id} level ${fmt(level)} at step ${t} is below min ${fmt(s.min)}`, t, `${base}/min`);
      if (!tol.le(level, s.capacity)) list.add('store-bounds', `store ${s.id} level ${fmt(level)} at step ${t} is above capacity ${fmt(s.capacity)}`, t, `${base}/capacity`);
      if (s.shortfallPenaltyPerUnit !== null) objective -= dh * s.shortfallPenaltyPerUnit * short;
      prev = level;
    }
    if (s.final !== null && T > 0 && entry.level[T - 1] < s.final - tol.of(s.final, s.capacity)) {
      list.add('store-final', `store ${s.id} ends at ${fmt(entry.level[T - 1])}, below its final level ${fmt(s.final)}`, T - 1, `${base}/final`);
    }
  });
  return objective;
}
