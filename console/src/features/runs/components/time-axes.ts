import { axisProps, compactNumber } from '@/components/chart-axes';
import { shortTime } from '../lib/chart-data';

/**
 * Every chart over the horizon shares these: one sync id, so hovering a step in one shows it in
 * all, and one margin and value-axis width, so the time axes of charts stacked under one another
 * line up step for step.
 */
export const timelineChartProps = { syncId: 'dispatch', margin: { top: 4, right: 12, bottom: 0, left: 0 } };
// Ticks are thinned from the end by default, which hid the horizon's first step; the start is the
// time an operator reads the plan from, so it keeps its tick.
export const timeAxisProps = { dataKey: 'time', tickFormatter: shortTime, minTickGap: 40, interval: 'preserveStart' as const, ...axisProps };
export const valueAxisProps = { ...axisProps, width: 56, tickFormatter: compactNumber };
export const stepLabel = (label: unknown) => shortTime(String(label));
