import { useMemo } from 'react';
import { Area, AreaChart, CartesianGrid, Legend, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import { chartColors } from '@/lib/chart-colors';
import { axisUnit, legendStyle, tickNumber, valueWithUnit } from '@/lib/chart-format';
import { bucketRows, gridPoints, shortTime } from '../lib/chart-data';
import { ChartFrame } from './chart-frame';
import { axisProps } from './supply-chart';

export function GridChart({ schedule }: { schedule: Schedule }) {
  const data = useMemo(() => bucketRows(gridPoints(schedule)), [schedule]);
  return (
    <ChartFrame title="Grid: import above, export below" note="kW">
      <ResponsiveContainer width="100%" height="100%">
        <AreaChart data={data} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis dataKey="time" tickFormatter={shortTime} minTickGap={40} {...axisProps} />
          <YAxis width={56} tickFormatter={(v) => tickNumber(Math.abs(Number(v)))} label={axisUnit('kW')} {...axisProps} />
          <ReferenceLine y={0} stroke={chartColors.grey} />
          <Tooltip labelFormatter={(l) => shortTime(String(l))} formatter={(v) => valueWithUnit('kW')(Math.abs(Number(v)))} />
          <Legend wrapperStyle={legendStyle} />
          <Area type="stepAfter" dataKey="importKw" name="Import" stroke={chartColors.ink} fill={chartColors.ink} fillOpacity={0.35} isAnimationActive={false} />
          <Area type="stepAfter" dataKey="exportKw" name="Export" stroke={chartColors.accent} fill={chartColors.accent} fillOpacity={0.45} isAnimationActive={false} />
        </AreaChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
