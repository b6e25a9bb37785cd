import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';

/** The most power one storage can take (charge) or give (discharge) in a step, in kW. */
export interface StoragePowerLimit {
  charge: number;
  discharge: number;
}

/** Each storage's inverter ratings, as the spec states them. */
export const storageRatings = (spec: ResolvedSiteSpec): StoragePowerLimit[] =>
  spec.storage.map((s) => ({ charge: s.maxChargeKw, discharge: s.maxDischargeKw }));

/**
 * Each storage's most power in one step of `dh` hours, limited by its SOC range as well as its
 * inverter (a step cannot charge more than fills it from its minimum, nor discharge more than
 * empties it to its minimum).
 */
export const storageStepLimits = (spec: ResolvedSiteSpec, dh: number): StoragePowerLimit[] =>
  spec.storage.map((s) => ({
    charge: Math.min(s.maxChargeKw, (s.capacityKwh - s.minSocKwh) / (dh * s.chargeEfficiency)),
    discharge: Math.min(s.maxDischargeKw, ((s.capacityKwh - s.minSocKwh) * s.dischargeEfficiency) / dh),
  }));

export interface RatingSums {
  generatorKw: number;
  flexibleLoadKw: number;
  chargeKw: number;
  dischargeKw: number;
}

/** The units' ratings summed by kind, and the storage limits given (the spec's ratings by default) summed. */
export function ratingSums(spec: ResolvedSiteSpec, storage: StoragePowerLimit[] = storageRatings(spec)): RatingSums {
  const sums: RatingSums = { generatorKw: 0, flexibleLoadKw: 0, chargeKw: 0, dischargeKw: 0 };
  for (const u of spec.units) {
    if (u.kind === 'generator') sums.generatorKw += u.ratingKw;
    else sums.flexibleLoadKw += u.ratingKw;
  }
  for (const l of storage) {
    sums.chargeKw += l.charge;
    sums.dischargeKw += l.discharge;
  }
  return sums;
}

/**
 * By the ratings in `sums`, the most power that can reach a flexible load at step t (supply,
 * import, every generator and storage discharging, less a hard site load), or that the site
 * can absorb from a generator (site load, export, every flexible load and storage charging).
 */
export function reachableKw(spec: ResolvedSiteSpec, sums: RatingSums, kind: ResolvedSiteSpec['units'][number]['kind'], t: number): number {
  const load = spec.siteLoad.kw[t];
  if (kind === 'generator') return load + spec.grid.exportLimitKw + sums.flexibleLoadKw + sums.chargeKw;
  const hardLoad = spec.siteLoad.unservedPenaltyPerKwh === null ? load : 0;
  return spec.supply.availableKw[t] + spec.grid.importLimitKw + sums.generatorKw + sums.dischargeKw - hardLoad;
}
