import { useMemo } from 'react';
import { Area, CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import { legendProps, withUnit } from '@/components/chart-axes';
import { ChartFrame } from '@/components/chart-frame';
import { chartColors } from '@/lib/chart-colors';
import { bucketRows, supplyPoints } from '../lib/chart-data';
import { stepLabel, timeAxisProps, timelineChartProps, valueAxisProps } from './time-axes';

export function SupplyChart({ schedule }: { schedule: Schedule }) {
  const data = useMemo(() => bucketRows(supplyPoints(schedule)), [schedule]);
  return (
    <ChartFrame title="Supply: available, used, curtailed" note="kW">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} {...timelineChartProps}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis {...timeAxisProps} />
          <YAxis {...valueAxisProps} />
          <Tooltip labelFormatter={stepLabel} formatter={withUnit('kW')} />
          <Legend {...legendProps} />
          <Area type="stepAfter" dataKey="usedKw" name="Used" stackId="s" stroke={chartColors.accent} fill={chartColors.accent} fillOpacity={0.75} isAnimationActive={false} />
          <Area type="stepAfter" dataKey="curtailedKw" name="Curtailed" stackId="s" stroke={chartColors.accentSoft} fill={chartColors.accentSoft} fillOpacity={0.6} isAnimationActive={false} />
          <Line type="stepAfter" dataKey="availableKw" name="Available" stroke={chartColors.ink} strokeWidth={1.25} strokeDasharray="4 3" dot={false} isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
