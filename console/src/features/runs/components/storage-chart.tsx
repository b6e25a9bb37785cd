import { useMemo } from 'react';
import { CartesianGrid, ComposedChart, Legend, Line, ReferenceArea, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import { chartColors } from '@/lib/chart-colors';
import { axisUnit, legendStyle, tickNumber, valueWithUnit } from '@/lib/chart-format';
import { formatNumber } from '@/lib/format';
import { bucketRows, shortTime, socPoints } from '../lib/chart-data';
import { ChartFrame } from './chart-frame';
import { axisProps } from './supply-chart';

export interface StorageLimits {
  id: string;
  capacityKwh: number;
  minSocKwh?: number;
  finalSocKwh?: number;
}

export function StorageChart({ schedule, storage }: { schedule: Schedule; storage: StorageLimits }) {
  const data = useMemo(() => bucketRows(socPoints(schedule, storage.id, storage)), [schedule, storage]);
  const min = storage.minSocKwh ?? 0;
  return (
    <ChartFrame title={`State of charge · ${storage.id}`} note={`kWh · limits ${formatNumber(min)}–${formatNumber(storage.capacityKwh)}`} height={200}>
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis dataKey="time" tickFormatter={shortTime} minTickGap={40} {...axisProps} />
          <YAxis width={56} domain={[0, storage.capacityKwh]} tickFormatter={tickNumber} label={axisUnit('kWh')} {...axisProps} />
          {/* The forbidden zone below the minimum is shaded, so a schedule hugging it is obvious. */}
          {min > 0 && <ReferenceArea y1={0} y2={min} fill={chartColors.greyLight} fillOpacity={0.5} />}
          <Tooltip labelFormatter={(l) => shortTime(String(l))} formatter={valueWithUnit('kWh')} />
          <Legend wrapperStyle={legendStyle} />
          <Line type="monotone" dataKey="capacityKwh" name="Capacity" stroke={chartColors.grey} strokeDasharray="2 3" dot={false} isAnimationActive={false} />
          <Line type="monotone" dataKey="minSocKwh" name="Minimum" stroke={chartColors.grey} strokeDasharray="2 3" dot={false} isAnimationActive={false} />
          <Line type="linear" dataKey="socKwh" name="State of charge" stroke={chartColors.accent} strokeWidth={2} dot={false} isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
