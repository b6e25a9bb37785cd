import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ResultWarning } from '@gridwright/shared/run-result';
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
    let genRatings = 0;
    for (const u of spec.units) if (u.kind === 'generator') genRatings += u.ratingKw;
    let discharge = 0;
    for (const s of spec.storage) discharge += Math.min(s.maxDischargeKw, ((s.capacityKwh - s.minSocKwh) * s.dischargeEfficiency) / dh);
    const short: number[] = [];
    let worst = 0;
    let worstStep = 0;
    for (let t = 0; t < T; t++) {
      const most = spec.supply.availableKw[t] + spec.grid.importLimitKw + genRatings + discharge;
      const excess = spec.siteLoad.kw[t] - most;
      if (excess > 1e-9 * Math.max(1, spec.siteLoad.kw[t])) {
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
    if (s.finalSocKwh > reachable + 1e-9 * Math.max(1, s.capacityKwh)) {
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

  spec.units.forEach((u, i) => {
    if (!u.initial.on) return;
    const mustStayOn = Math.min(T, Math.max(0, u.minUpSteps - u.initial.stepsInState));
    if (mustStayOn === 0 || u.minStableKw <= 0) return;
    const blocked: number[] = [];
    for (let t = 0; t < mustStayOn; t++) {
      if (u.kind === 'flexible-load') {
        let reach = spec.supply.availableKw[t] + spec.grid.importLimitKw;
        for (const o of spec.units) if (o.kind === 'generator') reach += o.ratingKw;
        for (const s of spec.storage) reach += s.maxDischargeKw;
        if (spec.siteLoad.unservedPenaltyPerKwh === null) reach -= spec.siteLoad.kw[t];
        if (reach < u.minStableKw - 1e-9) blocked.push(t);
      } else {
        let sink = spec.siteLoad.kw[t] + spec.grid.exportLimitKw;
        for (const o of spec.units) if (o.kind === 'flexible-load') sink += o.ratingKw;
        for (const s of spec.storage) sink += s.maxChargeKw;
        if (sink < u.minStableKw - 1e-9) blocked.push(t);
      }
    }
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
  return found;
}
