import { chartColors } from '@/lib/chart-colors';
import { formatNumber } from '@/lib/format';

export const axisProps = { tick: { fontSize: 11, fill: '#6b6761' }, tickLine: false, axisLine: { stroke: chartColors.greyLight } };

export const legendProps = { wrapperStyle: { fontSize: 11 } };

const compact = new Intl.NumberFormat('en-GB', { notation: 'compact', maximumSignificantDigits: 3 });

/** Axis ticks that fit a narrow axis whatever the magnitude: 250, 1.2K, 0.291. */
export const compactNumber = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? compact.format(v) : String(v));

/**
 * A tooltip formatter that names the unit beside every value, e.g. "12.5 kW"; null reads "no value".
 * `+ 0` turns -0 into 0, so a tooltip never reads "-0 kW".
 */
export const withUnit = (unit: string, digits = 3) => (v: unknown) => (v === null || v === undefined ? 'no value' : `${formatNumber(Number(v) + 0, digits)} ${unit}`);

/** The unit written along a value axis. */
export const axisUnit = (unit: string) => ({ value: unit, angle: -90, position: 'insideLeft' as const, offset: 10, style: { fontSize: 11, fill: '#6b6761', textAnchor: 'middle' as const } });

/** Whole-number ticks in the console's one number format. */
export const tickNumber = (value: unknown) => formatNumber(Number(value), 0);
