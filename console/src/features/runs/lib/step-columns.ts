import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { inSpecOrder } from './asset-order';
import { storeUnit } from './level-points';

export interface StepColumn {
  key: string;
  label: string;
  /** null where the schedule knows no value (a marginal value without a price). */
  value: (step: number) => number | null;
  onOff?: boolean;
  /** Decimals shown; prices need more than powers. */
  digits?: number;
}

const PRICE_DIGITS = 4;

const nonZero = (values: number[]) => values.some((v) => v !== 0);

/**
 * The step table's columns: the site's quantities first (reserve and the value of energy with them,
 * SPEC §5), then each unit, battery and store in spec order. A store's shortfall and spill get a
 * column only when they are not zero at every step.
 */
export function stepColumns(schedule: Schedule, spec?: Partial<Pick<SiteSpec, 'units' | 'storage' | 'stores'>>): StepColumn[] {
  const ordered = <T>(record: Record<string, T>, listed: { id: string }[] | undefined) => inSpecOrder(Object.keys(record), listed).map((id) => [id, record[id]] as const);
  const cols: StepColumn[] = [
    { key: 'used', label: 'Supply used kW', value: (t) => schedule.supplyUsedKw[t] },
    { key: 'curt', label: 'Curtailed kW', value: (t) => schedule.curtailedKw[t] },
    { key: 'unserved', label: 'Unserved kW', value: (t) => schedule.unservedKw[t] },
    { key: 'imp', label: 'Import kW', value: (t) => schedule.grid.importKw[t] },
    { key: 'exp', label: 'Export kW', value: (t) => schedule.grid.exportKw[t] },
  ];
  const reserve = schedule.reserve;
  if (reserve) {
    cols.push(
      { key: 'reserve:required', label: 'Reserve required kW', value: (t) => reserve.requiredKw[t] },
      { key: 'reserve:held', label: 'Reserve held kW', value: (t) => reserve.providedKw[t] },
      { key: 'reserve:short', label: 'Reserve short kW', value: (t) => reserve.shortfallKw[t] },
    );
  }
  cols.push({ key: 'value:energy', label: 'Value of energy money/kWh', value: (t) => schedule.marginalValues.energyPerKwh[t] ?? null, digits: PRICE_DIGITS });
  for (const [id, u] of ordered(schedule.units, spec?.units)) {
    cols.push({ key: `${id}:on`, label: `${id} on`, value: (t) => u.on[t], onOff: true });
    cols.push({ key: `${id}:p`, label: `${id} kW`, value: (t) => u.powerKw[t] });
    const held = u.reserveKw;
    if (held) cols.push({ key: `${id}:r`, label: `${id} reserve kW`, value: (t) => held[t] });
  }
  for (const [id, s] of ordered(schedule.storage, spec?.storage)) {
    cols.push({ key: `${id}:c`, label: `${id} charge kW`, value: (t) => s.chargeKw[t] });
    cols.push({ key: `${id}:d`, label: `${id} discharge kW`, value: (t) => s.dischargeKw[t] });
    cols.push({ key: `${id}:soc`, label: `${id} SOC kWh`, value: (t) => s.socKwh[t] });
    const held = s.reserveKw;
    if (held) cols.push({ key: `${id}:r`, label: `${id} reserve kW`, value: (t) => held[t] });
  }
  for (const [id, s] of ordered(schedule.stores, spec?.stores)) {
    const unit = storeUnit(spec?.stores?.find((x) => x.id === id));
    cols.push({ key: `${id}:level`, label: `${id} level ${unit}`, value: (t) => s.level[t] });
    if (nonZero(s.shortfall)) cols.push({ key: `${id}:short`, label: `${id} short ${unit}/h`, value: (t) => s.shortfall[t] });
    if (nonZero(s.spill)) cols.push({ key: `${id}:spill`, label: `${id} spill ${unit}/h`, value: (t) => s.spill[t] });
    const values = schedule.marginalValues.stores[id];
    if (values) cols.push({ key: `${id}:value`, label: `${id} value money/${unit}`, value: (t) => values[t] ?? null, digits: PRICE_DIGITS });
  }
  return cols;
}
