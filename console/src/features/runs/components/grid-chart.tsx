import { useMemo } from 'react';
import { Area, CartesianGrid, ComposedChart, Legend, Line, ReferenceArea, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import { legendProps, withUnit } from '@/components/chart-axes';
import { ChartFrame } from '@/components/chart-frame';
import { chartColors, seriesPalette } from '@/lib/chart-colors';
import { formatNumber } from '@/lib/format';
import { bucketRows } from '../lib/chart-data';
import { existingPeakKey, gridPoints, peakKey, windowSpans, type ChargeLine } from '../lib/demand-charge-windows';
import { stepLabel, timeAxisProps, timelineChartProps, valueAxisProps } from './time-axes';

const kw = withUnit('kW');

/**
 * Import above the axis, export below; each demand charge's window shaded, with the peak it is
 * billed on (and the peak it started from) drawn over the steps of its window only.
 */
export function GridChart({ schedule, charges }: { schedule: Schedule; charges: ChargeLine[] }) {
  const data = useMemo(() => bucketRows(gridPoints(schedule, charges)), [schedule, charges]);
  const colorOf = (i: number) => seriesPalette[(i + 2) % seriesPalette.length];
  return (
    <ChartFrame
      title="Grid: import above, export below"
      note={charges.length > 0 ? 'kW · shaded: demand-charge windows' : 'kW'}
      caption={
        charges.length > 0 && (
          <ul aria-label="Demand charges">
            {charges.map((c) => (
              <li key={c.id}>
                <span className="font-mono">{c.id}</span>: billed peak {formatNumber(c.peakKw)} kW over its window, {formatNumber(c.existingPeakKw)} kW already
                reached this period, so it costs {formatNumber(c.cost)} money for {formatNumber(Math.max(0, c.peakKw - c.existingPeakKw))} kW above that.
              </li>
            ))}
          </ul>
        )
      }
    >
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} {...timelineChartProps}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis {...timeAxisProps} />
          <YAxis {...valueAxisProps} />
          {charges.flatMap((c) =>
            windowSpans(data, c.id).map(([x1, x2]) => <ReferenceArea key={`${c.id}-${x1}`} x1={x1} x2={x2} fill={chartColors.greyLight} fillOpacity={0.35} ifOverflow="hidden" />),
          )}
          <ReferenceLine y={0} stroke={chartColors.grey} />
          <Tooltip labelFormatter={stepLabel} formatter={(v) => (v === null || v === undefined ? 'outside its window' : kw(Math.abs(Number(v))))} />
          <Legend {...legendProps} />
          <Area type="stepAfter" dataKey="importKw" name="Import" stroke={chartColors.ink} fill={chartColors.ink} fillOpacity={0.35} isAnimationActive={false} />
          <Area type="stepAfter" dataKey="exportKw" name="Export" stroke={chartColors.accent} fill={chartColors.accent} fillOpacity={0.45} isAnimationActive={false} />
          {charges.map((c, i) => (
            <Line key={`peak-${c.id}`} type="stepAfter" dataKey={peakKey(c.id)} name={`${c.id} billed peak`} stroke={colorOf(i)} strokeWidth={2} dot={false} connectNulls={false} isAnimationActive={false} />
          ))}
          {charges.map(
            (c, i) =>
              c.existingPeakKw > 0 && (
                <Line key={`existing-${c.id}`} type="stepAfter" dataKey={existingPeakKey(c.id)} name={`${c.id} existing peak`} stroke={colorOf(i)} strokeDasharray="2 3" dot={false} connectNulls={false} isAnimationActive={false} />
              ),
          )}
        </ComposedChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
