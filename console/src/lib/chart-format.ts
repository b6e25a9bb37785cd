import { formatNumber } from './format';

/**
 * What every chart states about its numbers, in the console's one number format: the unit beside the
 * value axis, tick labels, and tooltip values with their unit.
 */
export const axisUnit = (unit: string) => ({ value: unit, angle: -90, position: 'insideLeft' as const, offset: 10, style: { fontSize: 11, fill: '#6b6761', textAnchor: 'middle' as const } });

export const tickNumber = (value: unknown) => formatNumber(Number(value), 0);

// `+ 0` turns -0 into 0, so a tooltip never reads "-0 kW".
export const valueWithUnit = (unit: string) => (value: unknown) => `${formatNumber(Number(value) + 0)} ${unit}`;

export const legendStyle = { fontSize: 11 };
