import { MAX_POWER, MAX_PRICE, MIN_POWER, MIN_PRICE, isKnownTimeZone } from '@gridwright/shared/site-spec';
import { PRICE_UNIT, type SeriesKind } from '@gridwright/shared/series-roles';
import { kwValueRefusal } from '../lib/kw-values';

/**
 * What a CSV column holds, read from its header: a power (`pv [kW]`, `load (W)`, `pv_MW`), a price
 * (`import price [EUR/MWh]`, `tariff (per kWh)`, or a header that says price or tariff and names no
 * unit: money per kWh), or a rate of a product (`water demand [m3/h]`). Powers become kW and prices
 * money per kWh; a rate keeps the file's unit. A price is never run through W/kW/MW.
 */
export type PowerUnit = 'W' | 'kW' | 'MW';

export interface ColumnQuantity {
  kind: SeriesKind;
  /** The unit as the file states it (`W`, `EUR/MWh`, `kg/h`). */
  sourceUnit: string;
  /** The unit the series is stored in: `kW`, `per kWh`, or the rate's own. */
  unit: string;
  /** Multiplies a value of the file into the stored unit. */
  factor: number;
}

const POWER_FACTOR: Record<PowerUnit, number> = { W: 0.001, kW: 1, MW: 1000 };
const MAX_UNIT_LENGTH = 32;

const power = (unit: PowerUnit): ColumnQuantity => ({ kind: 'power', sourceUnit: unit, unit: 'kW', factor: POWER_FACTOR[unit] });

function powerUnitNamed(text: string): PowerUnit | null {
  const u = text.toLowerCase();
  return u === 'w' ? 'W' : u === 'kw' ? 'kW' : u === 'mw' ? 'MW' : null;
}

/** The unit in brackets or parentheses at the end of a header, e.g. `EUR/MWh` in `price [EUR/MWh]`. */
function bracketedUnit(header: string): string | null {
  const m = /[[(]\s*([^[\]()]+?)\s*[\])]\s*$/.exec(header);
  return m ? m[1] : null;
}

/** A unit written after the name without brackets: `pv_MW`, `load kW`, `price_per_kwh`. */
function trailingUnit(header: string): string | null {
  const perEnergy = /(?:^|[\s_.-])((?:[^\s_.-]+[\s_.-])?per[\s_.-](?:k|m)wh)\s*$/i.exec(header);
  if (perEnergy) return perEnergy[1].replace(/[\s_.-]+/g, ' ');
  const m = /(?:^|[\s_.-])(w|kw|mw)\s*$/i.exec(header);
  return m ? m[1] : null;
}

function quantityOfUnit(unit: string): ColumnQuantity | null {
  const asPower = powerUnitNamed(unit);
  if (asPower) return power(asPower);
  const price = /^(.*?)\s*(?:\/|\bper\s+)\s*(k|m)wh$/i.exec(unit);
  if (price) return { kind: 'price', sourceUnit: unit, unit: PRICE_UNIT, factor: price[2].toLowerCase() === 'm' ? 0.001 : 1 };
  const rate = /^(.+?)\s*\/\s*h$/i.exec(unit);
  if (rate && unit.length <= MAX_UNIT_LENGTH) return { kind: 'rate', sourceUnit: unit, unit, factor: 1 };
  return null;
}

/**
 * The quantity of a value column, or null when its header names none. `powerUnit` (the upload's
 * `unit` option) stands for the unit of every column that is not a price or a rate.
 */
export function columnQuantity(header: string, powerUnit?: PowerUnit): ColumnQuantity | null {
  const written = bracketedUnit(header) ?? trailingUnit(header);
  const stated = written ? quantityOfUnit(written) : null;
  if (stated && stated.kind !== 'power') return stated;
  if (powerUnit) return power(powerUnit);
  if (stated) return stated;
  if (/price|tariff/i.test(header)) return { kind: 'price', sourceUnit: PRICE_UNIT, unit: PRICE_UNIT, factor: 1 };
  return null;
}

/** Why a value cannot stand in a spec field of the column's kind, or null when it can (the contract's limits). */
export function seriesValueRefusal(kind: SeriesKind, value: number, unit: string): string | null {
  if (kind === 'power') return kwValueRefusal(value);
  if (!Number.isFinite(value)) return 'is not a finite number';
  if (kind === 'price') {
    if (Math.abs(value) > MAX_PRICE) return `is beyond ±${MAX_PRICE} ${unit}, the most a site spec holds`;
    if (value !== 0 && Math.abs(value) < MIN_PRICE) return `is below ${MIN_PRICE} in size; a site spec holds 0 or at least ${MIN_PRICE}`;
    return null;
  }
  if (value < 0) return `is negative; a ${unit} rate is at least 0`;
  if (value > MAX_POWER) return `is above ${MAX_POWER} ${unit}, the most a site spec holds`;
  if (value > 0 && value < MIN_POWER) return `is below ${MIN_POWER} ${unit}; a site spec holds 0 or at least ${MIN_POWER}`;
  return null;
}

/** An IANA zone named in the timestamp column's header, e.g. `time (Europe/Vienna)` or `local time [UTC]`. */
export function timeZoneFromHeader(header: string): string | null {
  const named = bracketedUnit(header);
  return named && /^[A-Za-z][A-Za-z0-9_+-]*(\/[A-Za-z0-9_+-]+)*$/.test(named) && isKnownTimeZone(named) ? named : null;
}
