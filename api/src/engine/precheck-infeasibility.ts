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
  return found;
}
