import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ResultWarning } from '@gridwright/shared/run-result';
import { ColKind, RowKind, type ModelTags } from './model-arrays';
import type { HorizonWindow } from './plan-window';
import { describeRanges, toStepRanges } from './step-ranges';

interface Part {
  pointer: string;
  what: string;
}

function curveField(spec: ResolvedSiteSpec, entity: number): string {
  return spec.units[entity].kind === 'generator' ? 'costCurve' : 'valueCurve';
}

function supplyOnlyPointer(spec: ResolvedSiteSpec): string {
  return `/storage/${Math.max(0, spec.storage.findIndex((s) => s.chargeFromSupplyOnly))}/chargeFromSupplyOnly`;
}

function rowPart(spec: ResolvedSiteSpec, kind: RowKind, entity: number): Part {
  const unit = spec.units[entity];
  const storage = spec.storage[entity];
  const store = spec.stores[entity];
  switch (kind) {
    case RowKind.UnitCurve:
      return { pointer: `/units/${entity}/${curveField(spec, entity)}`, what: `unit "${unit.id}" output split over its curve` };
    case RowKind.UnitColdStart:
      return { pointer: `/units/${entity}/startupCost`, what: `unit "${unit.id}" hot and cold starts` };
    case RowKind.UnitRampUp:
      return { pointer: `/units/${entity}/rampUpKwPerMin`, what: `unit "${unit.id}" ramp-up limit` };
    case RowKind.UnitRampDown:
      return { pointer: `/units/${entity}/rampDownKwPerMin`, what: `unit "${unit.id}" ramp-down limit` };
    case RowKind.UnitStartExact:
      return { pointer: `/units/${entity}/initial`, what: `unit "${unit.id}" starts and stops` };
    case RowKind.ReserveRequirement:
      return { pointer: '/reserve/upKw', what: 'the spinning reserve requirement' };
    case RowKind.UnitReserve:
      return { pointer: `/units/${entity}/providesReserve`, what: `unit "${unit.id}" reserve headroom` };
    case RowKind.StorageReserveFlow:
    case RowKind.StorageReserveEnergy:
      return { pointer: `/storage/${entity}/providesReserve`, what: `storage "${storage.id}" reserve (power and energy above its minimum)` };
    case RowKind.DemandChargePeak:
      return { pointer: `/grid/demandCharges/${entity}`, what: `demand charge "${spec.grid.demandCharges[entity].id}" peak` };
    case RowKind.SupplyOnlyImport:
      return { pointer: supplyOnlyPointer(spec), what: 'import kept from a battery that charges from supply only' };
    case RowKind.StoreLevel:
      return { pointer: `/stores/${entity}/demandPerHour`, what: `store "${store.id}" level balance (production, consumption and demand)` };
    case RowKind.StoreEndValue:
      return { pointer: `/stores/${entity}`, what: `store "${store.id}" value of product left at the window's end` };
    case RowKind.Balance:
      return { pointer: '/siteLoad/kw', what: 'the power balance (site load against supply, grid, units and storage)' };
    case RowKind.UnitMinStable:
      return { pointer: `/units/${entity}/minStableKw`, what: `unit "${unit.id}" minimum stable output` };
    case RowKind.UnitMaxPower:
      return { pointer: `/units/${entity}/ratingKw`, what: `unit "${unit.id}" rating` };
    case RowKind.UnitStart:
      return { pointer: `/units/${entity}/initial`, what: `unit "${unit.id}" start-up` };
    case RowKind.UnitMinUp:
      return { pointer: `/units/${entity}/minUpSteps`, what: `unit "${unit.id}" minimum up time` };
    case RowKind.UnitMinDown:
      return { pointer: `/units/${entity}/minDownSteps`, what: `unit "${unit.id}" minimum down time` };
    case RowKind.StorageSoc:
      return { pointer: `/storage/${entity}`, what: `storage "${storage.id}" state-of-charge balance` };
    case RowKind.StorageChargeExclusive:
    case RowKind.StorageDischargeExclusive:
      return { pointer: `/storage/${entity}`, what: `storage "${storage.id}" charge/discharge exclusivity` };
    default:
      return { pointer: '/grid', what: 'grid import/export exclusivity' };
  }
}

function colPart(spec: ResolvedSiteSpec, kind: ColKind, entity: number, lastStep: boolean): Part {
  const unit = spec.units[entity];
  const storage = spec.storage[entity];
  const store = spec.stores[entity];
  switch (kind) {
    case ColKind.UnitSlice:
      return { pointer: `/units/${entity}/${curveField(spec, entity)}`, what: `unit "${unit.id}" curve slices` };
    case ColKind.UnitColdStart:
      return { pointer: `/units/${entity}/startupCost`, what: `unit "${unit.id}" cold starts` };
    case ColKind.UnitReserve:
      return { pointer: `/units/${entity}/providesReserve`, what: `unit "${unit.id}" reserve` };
    case ColKind.StorageReserve:
      return { pointer: `/storage/${entity}/providesReserve`, what: `storage "${storage.id}" reserve` };
    case ColKind.ReserveShortfall:
      return { pointer: '/reserve/shortfallPenaltyPerKwh', what: 'reserve shortfall (at most the requirement)' };
    case ColKind.DemandPeak:
      return { pointer: `/grid/demandCharges/${entity}/existingPeakKw`, what: `demand charge "${spec.grid.demandCharges[entity].id}" peak` };
    case ColKind.StoreLevel:
      return lastStep && store.final !== null
        ? { pointer: `/stores/${entity}/final`, what: `store "${store.id}" final level` }
        : { pointer: `/stores/${entity}/capacity`, what: `store "${store.id}" level limits (min and capacity)` };
    case ColKind.StoreShortfall:
      return { pointer: `/stores/${entity}/demandPerHour`, what: `store "${store.id}" shortfall (at most the demand)` };
    case ColKind.StoreSpill:
      return { pointer: `/stores/${entity}/spillAllowed`, what: `store "${store.id}" spill` };
    case ColKind.StoreEndValue:
      return { pointer: `/stores/${entity}`, what: `store "${store.id}" value of product left at the window's end` };
    case ColKind.Supply:
      return { pointer: '/supply/availableKw', what: 'available supply' };
    case ColKind.Import:
      return { pointer: '/grid/importLimitKw', what: 'the grid import limit' };
    case ColKind.Export:
      return { pointer: '/grid/exportLimitKw', what: 'the grid export limit' };
    case ColKind.Unserved:
      return { pointer: '/siteLoad/kw', what: 'unserved load (at most the site load)' };
    case ColKind.UnitOn:
    case ColKind.UnitStart:
      return { pointer: `/units/${entity}/initial`, what: `unit "${unit.id}" on/off state carried from its initial state` };
    case ColKind.UnitPower:
      return { pointer: `/units/${entity}/ratingKw`, what: `unit "${unit.id}" power limit` };
    case ColKind.StorageCharge:
      return { pointer: `/storage/${entity}/maxChargeKw`, what: `storage "${storage.id}" charge limit` };
    case ColKind.StorageDischarge:
      return { pointer: `/storage/${entity}/maxDischargeKw`, what: `storage "${storage.id}" discharge limit` };
    case ColKind.StorageSoc:
      return lastStep && storage.finalSocKwh !== null
        ? { pointer: `/storage/${entity}/finalSocKwh`, what: `storage "${storage.id}" final SOC target` }
        : { pointer: `/storage/${entity}/minSocKwh`, what: `storage "${storage.id}" SOC limits` };
    default:
      return { pointer: '/grid', what: 'grid import/export exclusivity' };
  }
}

/** Turns HiGHS's infeasible subsystem (rows and bounds of one window) into spec paths and steps. */
export function diagnoseInfeasibleSubsystem(
  spec: ResolvedSiteSpec,
  window: HorizonWindow,
  tags: ModelTags,
  iis: { rows: Int32Array; cols: Int32Array },
): ResultWarning[] {
  const groups = new Map<string, { part: Part; steps: Set<number> }>();
  const add = (part: Part, step: number) => {
    const key = `${part.pointer}|${part.what}`;
    const g = groups.get(key) ?? { part, steps: new Set<number>() };
    g.steps.add(window.from + step);
    groups.set(key, g);
  };
  for (const r of iis.rows) add(rowPart(spec, tags.rowKind[r], tags.rowEntity[r]), tags.rowStep[r]);
  for (const c of iis.cols) {
    const step = tags.colStep[c];
    add(colPart(spec, tags.colKind[c], tags.colEntity[c], window.from + step === spec.horizon.steps - 1), step);
  }
  return [...groups.values()].map(({ part, steps }) => {
    const ranges = toStepRanges([...steps].sort((a, b) => a - b));
    return {
      code: 'infeasible-subsystem',
      message: `Part of a conflict the solver isolated: ${part.what} at ${describeRanges(ranges)}.`,
      pointer: part.pointer,
      steps: ranges,
    };
  });
}
