import { useMemo } from 'react';
import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import { chartColors, seriesPalette } from '@/lib/chart-colors';
import { axisUnit, legendStyle, tickNumber, valueWithUnit } from '@/lib/chart-format';
import { bucketRows, shortTime, unitPowerPoints, unitStrips } from '../lib/chart-data';
import { ChartFrame } from './chart-frame';
import { axisProps } from './supply-chart';

/** One row per unit: filled cells where it is on, drawn as SVG so 35 000 steps stay cheap. */
export function UnitStrips({ schedule }: { schedule: Schedule }) {
  const strips = useMemo(() => unitStrips(schedule), [schedule]);
  const steps = schedule.timestamps.length;
  if (strips.length === 0) return null;
  return (
    <ChartFrame title="Units on/off" note={`${steps} steps · filled = on`} height={strips.length * 22 + 18}>
      <div className="space-y-1.5">
        {strips.map((s, i) => (
          <div key={s.id} className="flex items-center gap-2">
            <span className="w-24 truncate font-mono text-[11px] text-ash-700" title={s.id}>
              {s.id}
            </span>
            <svg viewBox={`0 0 ${steps} 1`} preserveAspectRatio="none" className="h-4 flex-1 rounded-sm bg-ash-100" role="img" aria-label={`${s.id}: on for ${s.onSteps} of ${steps} steps`}>
              {s.segments
                .filter((seg) => seg.on)
                .map((seg) => (
                  <rect key={seg.from} x={seg.from} width={seg.to - seg.from + 1} y={0} height={1} fill={seriesPalette[i % seriesPalette.length]} />
                ))}
            </svg>
            <span className="w-16 text-right font-mono text-[11px] text-ash-500">{s.onSteps} on</span>
          </div>
        ))}
        <div className="flex justify-between pl-26 pr-18 text-[10px] text-ash-400">
          <span>{shortTime(schedule.timestamps[0] ?? '')}</span>
          <span>{shortTime(schedule.timestamps[steps - 1] ?? '')}</span>
        </div>
      </div>
    </ChartFrame>
  );
}

export function UnitPowerChart({ schedule }: { schedule: Schedule }) {
  const ids = Object.keys(schedule.units);
  const data = useMemo(() => bucketRows(unitPowerPoints(schedule)), [schedule]);
  if (ids.length === 0) return null;
  return (
    <ChartFrame title="Unit power" note="kW">
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis dataKey="time" tickFormatter={shortTime} minTickGap={40} {...axisProps} />
          <YAxis width={56} tickFormatter={tickNumber} label={axisUnit('kW')} {...axisProps} />
          <Tooltip labelFormatter={(l) => shortTime(String(l))} formatter={valueWithUnit('kW')} />
          <Legend wrapperStyle={legendStyle} />
          {ids.map((id, i) => (
            <Line key={id} type="stepAfter" dataKey={id} name={id} stroke={seriesPalette[i % seriesPalette.length]} strokeWidth={1.5} dot={false} isAnimationActive={false} />
          ))}
        </LineChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
