import { useMemo } from 'react';
import { Area, CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import { chartColors } from '@/lib/chart-colors';
import { axisUnit, legendStyle, tickNumber, valueWithUnit } from '@/lib/chart-format';
import { bucketRows, shortTime, supplyPoints } from '../lib/chart-data';
import { ChartFrame } from './chart-frame';

export const axisProps = { tick: { fontSize: 11, fill: '#6b6761' }, tickLine: false, axisLine: { stroke: chartColors.greyLight } };

export function SupplyChart({ schedule }: { schedule: Schedule }) {
  const data = useMemo(() => bucketRows(supplyPoints(schedule)), [schedule]);
  return (
    <ChartFrame title="Supply: available, used, curtailed" note="kW">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis dataKey="time" tickFormatter={shortTime} minTickGap={40} {...axisProps} />
          <YAxis width={56} tickFormatter={tickNumber} label={axisUnit('kW')} {...axisProps} />
          <Tooltip labelFormatter={(l) => shortTime(String(l))} formatter={valueWithUnit('kW')} />
          <Legend wrapperStyle={legendStyle} />
          <Area type="stepAfter" dataKey="usedKw" name="Used" stackId="s" stroke={chartColors.accent} fill={chartColors.accent} fillOpacity={0.75} isAnimationActive={false} />
          <Area type="stepAfter" dataKey="curtailedKw" name="Curtailed" stackId="s" stroke={chartColors.accentSoft} fill={chartColors.accentSoft} fillOpacity={0.6} isAnimationActive={false} />
          <Line type="stepAfter" dataKey="availableKw" name="Available" stroke={chartColors.ink} strokeWidth={1.25} strokeDasharray="4 3" dot={false} isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
