import { stringify } from 'csv-stringify/sync';
import type { Schedule } from '@gridwright/shared/run-result';

/** One row per step, one column per series (kW, kWh for SOC), for the CLI's --csv. */
export function scheduleToCsv(schedule: Schedule): string {
  const unitIds = Object.keys(schedule.units);
  const storageIds = Object.keys(schedule.storage);
  const header = [
    'timestamp',
    'step',
    'supply_used_kw',
    'curtailed_kw',
    'unserved_kw',
    'import_kw',
    'export_kw',
    ...unitIds.flatMap((id) => [`${id}_on`, `${id}_kw`]),
    ...storageIds.flatMap((id) => [`${id}_charge_kw`, `${id}_discharge_kw`, `${id}_soc_kwh`]),
  ];
  const rows = schedule.timestamps.map((ts, t) => [
    ts,
    t,
    schedule.supplyUsedKw[t],
    schedule.curtailedKw[t],
    schedule.unservedKw[t],
    schedule.grid.importKw[t],
    schedule.grid.exportKw[t],
    ...unitIds.flatMap((id) => [schedule.units[id].on[t], schedule.units[id].powerKw[t]]),
    ...storageIds.flatMap((id) => {
      const s = schedule.storage[id];
      return [s.chargeKw[t], s.dischargeKw[t], s.socKwh[t]];
    }),
  ]);
  return stringify([header, ...rows]);
}

/** The header alone, for an outcome without a schedule. */
export function emptyScheduleCsv(unitIds: string[], storageIds: string[]): string {
  return scheduleToCsv({
    timestamps: [],
    supplyUsedKw: [],
    curtailedKw: [],
    unservedKw: [],
    grid: { importKw: [], exportKw: [] },
    units: Object.fromEntries(unitIds.map((id) => [id, { on: [], powerKw: [] }])),
    storage: Object.fromEntries(storageIds.map((id) => [id, { chargeKw: [], dischargeKw: [], socKwh: [] }])),
  });
}
