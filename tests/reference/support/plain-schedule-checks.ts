/**
 * Our own reading of a schedule against SPEC.md §5's ramp, reserve and store rules, written
 * from SPEC alone for the property checks (independent of the engine's verifier, whose
 * verdict the properties check separately). Each returns what it finds wrong, as text.
 * Tolerance: 1e-6 relative to the larger figure compared, plus 1e-6 absolute.
 */
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import { reserveHeadroom } from './plain-formulation';

const within = (x: number, limit: number) => x <= limit + 1e-6 * (1 + Math.max(Math.abs(x), Math.abs(limit)));

/**
 * Per step R = kW/min · stepMinutes. On in both steps: p_t − p_{t−1} ≤ R_up and p_{t−1} − p_t ≤
 * R_down. A start: p_t ≤ max(minStable, R_up). A stop: p_{t−1} ≤ max(minStable, R_down). Step −1
 * is the initial state, with no limit at step 0 for a unit on at an unknown output.
 */
export function rampBreaches(spec: ResolvedSiteSpec, schedule: Schedule): string[] {
  const found: string[] = [];
  const minutes = spec.horizon.stepMinutes;
  for (const unit of spec.units) {
    const up = unit.rampUpKwPerMin === null ? Number.POSITIVE_INFINITY : unit.rampUpKwPerMin * minutes;
    const down = unit.rampDownKwPerMin === null ? Number.POSITIVE_INFINITY : unit.rampDownKwPerMin * minutes;
    const { on, powerKw } = schedule.units[unit.id];
    for (let t = 0; t < spec.horizon.steps; t++) {
      const wasOn = t === 0 ? unit.initial.on : on[t - 1] === 1;
      const before = t === 0 ? (unit.initial.on ? unit.initial.powerKw : 0) : powerKw[t - 1];
      if (before === null) continue;
      const now = on[t] === 1 ? powerKw[t] : 0;
      if (on[t] === 1 && wasOn && !within(now - before, up)) found.push(`${unit.id} rises ${before} → ${now} at step ${t} (limit ${up})`);
      if (on[t] === 1 && wasOn && !within(before - now, down)) found.push(`${unit.id} falls ${before} → ${now} at step ${t} (limit ${down})`);
      if (on[t] === 1 && !wasOn && !within(now, Math.max(unit.minStableKw, up))) found.push(`${unit.id} starts at ${now} at step ${t}`);
      if (on[t] === 0 && wasOn && !within(before, Math.max(unit.minStableKw, down))) found.push(`${unit.id} stops from ${before} at step ${t}`);
    }
  }
  return found;
}

/**
 * The reserve the setpoints can hold (plain-formulation.ts's headroom) against the requirement:
 * never short when it is hard; the reported shortfall is what is missing when it is soft.
 */
export function reserveBreaches(spec: ResolvedSiteSpec, schedule: Schedule): string[] {
  if (!spec.reserve) return schedule.reserve === null ? [] : ['a reserve block without a requirement'];
  if (!schedule.reserve) return ['no reserve block'];
  const found: string[] = [];
  const held = reserveHeadroom(spec, schedule);
  spec.reserve.upKw.forEach((required, t) => {
    const short = Math.max(0, required - held[t]);
    if (spec.reserve!.shortfallPenaltyPerKwh === null && !within(required, held[t])) found.push(`hard reserve ${required} at step ${t}, held ${held[t]}`);
    if (!within(Math.abs(schedule.reserve!.shortfallKw[t] - short), 0)) found.push(`reported shortfall ${schedule.reserve!.shortfallKw[t]} at step ${t}, missing ${short}`);
  });
  return found;
}

/**
 * Each store's level follows (1 − loss·Δh)·level_{t−1} + Δh·(made − used − demand + short −
 * spill), stays within [min, capacity], ends at `final` or more; shortfall in [0, demand] and
 * 0 when the demand is hard; spill ≥ 0 and 0 unless allowed.
 */
export function storeBreaches(spec: ResolvedSiteSpec, schedule: Schedule): string[] {
  const found: string[] = [];
  const dh = spec.horizon.stepMinutes / 60;
  spec.stores.forEach((store, m) => {
    const { level, shortfall, spill } = schedule.stores[store.id];
    let previous = store.initial;
    for (let t = 0; t < spec.horizon.steps; t++) {
      let flow = -store.demandPerHour[t] + shortfall[t] - spill[t];
      spec.units.forEach((unit) => {
        const p = schedule.units[unit.id].powerKw[t];
        if (unit.produces?.store === m) flow += unit.produces.perKwh * p;
        if (unit.consumes?.store === m) flow -= unit.consumes.perKwh * p;
      });
      const expected = (1 - store.lossPerHour * dh) * previous + dh * flow;
      if (!within(Math.abs(level[t] - expected), 1e-6 * store.capacity)) found.push(`${store.id} level ${level[t]} at step ${t}, the flows give ${expected}`);
      if (!within(store.min, level[t]) || !within(level[t], store.capacity)) found.push(`${store.id} level ${level[t]} at step ${t} outside [${store.min}, ${store.capacity}]`);
      const maxShort = store.shortfallPenaltyPerUnit === null ? 0 : store.demandPerHour[t];
      if (!within(0, shortfall[t]) || !within(shortfall[t], maxShort)) found.push(`${store.id} shortfall ${shortfall[t]} at step ${t} outside [0, ${maxShort}]`);
      if (!within(0, spill[t]) || (!store.spillAllowed && !within(spill[t], 0))) found.push(`${store.id} spills ${spill[t]} at step ${t}`);
      previous = level[t];
    }
    if (store.final !== null && !within(store.final, level[spec.horizon.steps - 1])) found.push(`${store.id} ends at ${level[spec.horizon.steps - 1]} below ${store.final}`);
  });
  return found;
}
