import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ResultWarning } from '@gridwright/shared/run-result';
import { TINY, tinyAt } from './numerics';
import { ratingSums, reachableKw, storageStepLimits } from './site-ratings';
import { describeRanges, toStepRanges } from './step-ranges';

const fmt = (v: number) => String(Math.round(v * 1000) / 1000);

/**
 * Cheap proofs of infeasibility, checked before any model is built. Each names the steps and
 * the parts of the spec that conflict. An empty list proves nothing; the solver decides then.
 */
export function precheckInfeasibility(spec: ResolvedSiteSpec): ResultWarning[] {
  const found: ResultWarning[] = [];
  const T = spec.horizon.steps;
  const dh = spec.horizon.stepMinutes / 60;

  if (spec.siteLoad.unservedPenaltyPerKwh === null) {
    const { generatorKw, dischargeKw } = ratingSums(spec, storageStepLimits(spec, dh));
    const short: number[] = [];
    let worst = 0;
    let worstStep = 0;
    for (let t = 0; t < T; t++) {
      const most = spec.supply.availableKw[t] + spec.grid.importLimitKw + generatorKw + dischargeKw;
      const excess = spec.siteLoad.kw[t] - most;
      if (excess > tinyAt(spec.siteLoad.kw[t])) {
        short.push(t);
        if (excess > worst) {
          worst = excess;
          worstStep = t;
        }
      }
    }
    if (short.length) {
      const ranges = toStepRanges(short);
      found.push({
        code: 'hard-load-exceeds-supply',
        message:
          `Hard site load exceeds the most that supply, grid import, generators and storage can deliver at ${describeRanges(ranges)} ` +
          `(worst: step ${worstStep}, ${fmt(spec.siteLoad.kw[worstStep])} kW load, ${fmt(worst)} kW short). ` +
          'Lower the load there, add supply, or set siteLoad.unservedPenaltyPerKwh to allow unserved load.',
        pointer: '/siteLoad/kw',
        steps: ranges,
      });
    }
  }

  spec.storage.forEach((s, i) => {
    if (s.finalSocKwh === null) return;
    const reachable = Math.min(s.capacityKwh, s.initialSocKwh + T * dh * s.chargeEfficiency * s.maxChargeKw);
    if (s.finalSocKwh > reachable + tinyAt(s.capacityKwh)) {
      found.push({
        code: 'final-soc-unreachable',
        message:
          `Storage "${s.id}" cannot reach its final SOC target of ${fmt(s.finalSocKwh)} kWh: charging at ${fmt(s.maxChargeKw)} kW ` +
          `for the whole horizon from ${fmt(s.initialSocKwh)} kWh reaches at most ${fmt(reachable)} kWh.`,
        pointer: `/storage/${i}/finalSocKwh`,
        steps: [{ from: T - 1, to: T - 1 }],
      });
    }
  });

  const sums = ratingSums(spec);
  spec.units.forEach((u, i) => {
    if (!u.initial.on) return;
    const mustStayOn = Math.min(T, Math.max(0, u.minUpSteps - u.initial.stepsInState));
    if (mustStayOn === 0 || u.minStableKw <= 0) return;
    const blocked: number[] = [];
    for (let t = 0; t < mustStayOn; t++) if (reachableKw(spec, sums, u.kind, t) < u.minStableKw - TINY) blocked.push(t);
    if (blocked.length) {
      const ranges = toStepRanges(blocked);
      found.push({
        code: 'initial-state-conflict',
        message:
          `Unit "${u.id}" starts on and must stay on for ${mustStayOn} more step(s) (minUpSteps ${u.minUpSteps}), but at ${describeRanges(ranges)} ` +
          `it cannot reach its minStableKw of ${fmt(u.minStableKw)} kW.`,
        pointer: `/units/${i}/initial`,
        steps: ranges,
      });
    }
  });
  found.push(...reserveConflicts(spec), ...storeConflicts(spec), ...rampConflicts(spec));
  return found;
}

/** A hard reserve above the most that every provider together could hold, at any output. */
function reserveConflicts(spec: ResolvedSiteSpec): ResultWarning[] {
  const reserve = spec.reserve;
  if (!reserve || reserve.shortfallPenaltyPerKwh !== null) return [];
  const dh = spec.horizon.stepMinutes / 60;
  let most = 0;
  for (const u of spec.units) if (u.providesReserve) most += u.ratingKw - u.minStableKw;
  for (const s of spec.storage) {
    if (s.providesReserve) most += Math.min(s.maxDischargeKw + s.maxChargeKw, (s.dischargeEfficiency * (s.capacityKwh - s.minSocKwh)) / dh);
  }
  const short: number[] = [];
  for (let t = 0; t < spec.horizon.steps; t++) if (reserve.upKw[t] > most + 1e-9 * Math.max(1, most)) short.push(t);
  if (!short.length) return [];
  const ranges = toStepRanges(short);
  return [
    {
      code: 'reserve-unholdable',
      message:
        `The spinning reserve required at ${describeRanges(ranges)} is more than the units and batteries that provide reserve ` +
        `could ever hold together (${fmt(most)} kW, every one online with all its headroom). Lower reserve.upKw there, let more ` +
        'units provide reserve, or set reserve.shortfallPenaltyPerKwh to allow a shortfall.',
      pointer: '/reserve/upKw',
      steps: ranges,
    },
  ];
}

/**
 * A store whose hard demand, minimum or final level its producers can never keep up with: filled as
 * fast as every producer at full rating allows (never above capacity), with nothing consumed, its
 * level is the highest any schedule can reach at every step; where even that falls below the minimum,
 * or ends below the final level, no schedule exists.
 */
function storeConflicts(spec: ResolvedSiteSpec): ResultWarning[] {
  const found: ResultWarning[] = [];
  const dh = spec.horizon.stepMinutes / 60;
  spec.stores.forEach((s, j) => {
    let production = 0;
    for (const u of spec.units) if (u.produces?.store === j) production += u.produces.perKwh * u.ratingKw;
    const hard = s.shortfallPenaltyPerUnit === null;
    const tol = 1e-9 * Math.max(1, s.capacity);
    const unit = s.unit ? ` ${s.unit}` : '';
    let level = s.initial;
    for (let t = 0; t < spec.horizon.steps; t++) {
      level = Math.min(s.capacity, (1 - s.lossPerHour * dh) * level + dh * (production + s.inflowPerHour[t] - (hard ? s.demandPerHour[t] : 0)));
      if (level < s.min - tol) {
        found.push({
          code: 'store-demand-unmet',
          message:
            `Store "${s.id}" cannot meet its demand: even with every producer at full rating from the start, its level would fall ` +
            `to ${fmt(level)}${unit} at step ${t}, below its minimum of ${fmt(s.min)}${unit}. Lower the demand, add production, ` +
            'or set shortfallPenaltyPerUnit to allow a shortfall.',
          pointer: `/stores/${j}/demandPerHour`,
          steps: [{ from: t, to: t }],
        });
        return;
      }
    }
    const T = spec.horizon.steps;
    if (s.final !== null && T > 0 && level < s.final - tol) {
      found.push({
        code: 'store-final-unreachable',
        message: `Store "${s.id}" cannot reach its final level of ${fmt(s.final)}${unit}: filled as fast as its producers allow, it ends at ${fmt(level)}${unit}.`,
        pointer: `/stores/${j}/final`,
        steps: [{ from: T - 1, to: T - 1 }],
      });
    }
  });
  return found;
}

/**
 * A hard load that the generators cannot reach in time because of their ramps: from the output
 * before the horizon (or off, from a start at the start allowance), each ramps up as fast as it may.
 * Only reported where the same load without ramp limits could be served.
 */
function rampConflicts(spec: ResolvedSiteSpec): ResultWarning[] {
  if (spec.siteLoad.unservedPenaltyPerKwh !== null) return [];
  const gens = spec.units.map((u, i) => ({ u, i })).filter(({ u }) => u.kind === 'generator');
  const ramped = gens.filter(({ u }) => u.rampUpKwPerMin !== null);
  if (!ramped.length) return [];
  const T = spec.horizon.steps;
  const dh = spec.horizon.stepMinutes / 60;
  let discharge = 0;
  for (const s of spec.storage) discharge += Math.min(s.maxDischargeKw, ((s.capacityKwh - s.minSocKwh) * s.dischargeEfficiency) / dh);
  const short: number[] = [];
  for (let t = 0; t < T; t++) {
    const others = spec.supply.availableKw[t] + spec.grid.importLimitKw + discharge;
    let unlimited = others;
    let reachable = others;
    for (const { u } of gens) {
      unlimited += u.ratingKw;
      reachable += reachKw(u, t, spec.horizon.stepMinutes);
    }
    const L = spec.siteLoad.kw[t];
    if (L <= unlimited + 1e-9 * Math.max(1, L) && L > reachable + 1e-9 * Math.max(1, L)) short.push(t);
  }
  if (!short.length) return [];
  const ranges = toStepRanges(short);
  return ramped.map(({ u, i }) => ({
    code: 'ramp-cannot-reach-load',
    message:
      `The hard site load at ${describeRanges(ranges)} needs more than the generators can reach by then: "${u.id}" ramps up at most ` +
      `${fmt(u.rampUpKwPerMin! * spec.horizon.stepMinutes)} kW per step from ${u.initial.on ? `${fmt(u.initial.powerKw ?? u.ratingKw)} kW` : 'off'}. ` +
      'Start earlier (initial state), allow faster ramps, or set siteLoad.unservedPenaltyPerKwh.',
    pointer: `/units/${i}/rampUpKwPerMin`,
    steps: ranges,
  }));
}

/** The most a generator can put out at step t, ramping up from its initial state as fast as it may. */
function reachKw(u: ResolvedSiteSpec['units'][number], t: number, stepMinutes: number): number {
  if (u.rampUpKwPerMin === null) return u.ratingKw;
  const up = u.rampUpKwPerMin * stepMinutes;
  if (u.initial.on) return u.initial.powerKw === null ? u.ratingKw : Math.min(u.ratingKw, u.initial.powerKw + up * (t + 1));
  return Math.min(u.ratingKw, Math.max(u.minStableKw, up) + up * t);
}
