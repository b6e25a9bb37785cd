import { useMemo } from 'react';
import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { legendProps, withUnit } from '@/components/chart-axes';
import { ChartFrame } from '@/components/chart-frame';
import { chartColors } from '@/lib/chart-colors';
import { assetColors, inSpecOrder } from '../lib/asset-order';
import { bucketRows, reserveKey, shortTime, unitPowerPoints, unitStrips } from '../lib/chart-data';
import { stepLabel, timeAxisProps, timelineChartProps, valueAxisProps } from './time-axes';

/** One row per unit: filled cells where it is on, drawn as SVG so 35 000 steps stay cheap. */
type AssetSpec = Pick<SiteSpec, 'units' | 'storage'> | undefined;

export function UnitStrips({ schedule, spec }: { schedule: Schedule; spec: AssetSpec }) {
  const strips = useMemo(() => {
    const byId = new Map(unitStrips(schedule).map((s) => [s.id, s]));
    return inSpecOrder([...byId.keys()], spec?.units).map((id) => byId.get(id)!);
  }, [schedule, spec]);
  const colors = useMemo(() => assetColors(schedule, spec), [schedule, spec]);
  const steps = schedule.timestamps.length;
  if (strips.length === 0) return null;
  return (
    <ChartFrame title="Units on/off" note={`${steps} steps · filled = on`} height={strips.length * 22 + 18}>
      <div className="space-y-1.5">
        {strips.map((s) => (
          <div key={s.id} className="flex items-center gap-2">
            <span className="w-24 truncate font-mono text-[11px] text-ash-700" title={s.id}>
              {s.id}
            </span>
            <svg viewBox={`0 0 ${steps} 1`} preserveAspectRatio="none" className="h-4 flex-1 rounded-sm bg-ash-100" role="img" aria-label={`${s.id}: on for ${s.onSteps} of ${steps} steps`}>
              {s.segments
                .filter((seg) => seg.on)
                .map((seg) => (
                  <rect key={seg.from} x={seg.from} width={seg.to - seg.from + 1} y={0} height={1} fill={colors.get(s.id)} />
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

/** Every unit's power; a unit that holds spinning reserve also gets its reserve, dashed, in its own colour. */
export function UnitPowerChart({ schedule, spec }: { schedule: Schedule; spec: AssetSpec }) {
  const units = inSpecOrder(Object.keys(schedule.units), spec?.units).map((id) => [id, schedule.units[id]] as const);
  const colors = useMemo(() => assetColors(schedule, spec), [schedule, spec]);
  const data = useMemo(() => bucketRows(unitPowerPoints(schedule)), [schedule]);
  if (units.length === 0) return null;
  const holdsReserve = units.some(([, u]) => u.reserveKw);
  return (
    <ChartFrame title={holdsReserve ? 'Unit power and reserve held' : 'Unit power'} note={holdsReserve ? 'kW · dashed: spinning reserve held' : 'kW'}>
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} {...timelineChartProps}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis {...timeAxisProps} />
          <YAxis {...valueAxisProps} />
          <Tooltip labelFormatter={stepLabel} formatter={withUnit('kW')} />
          <Legend {...legendProps} />
          {units.map(([id]) => (
            <Line key={id} type="stepAfter" dataKey={id} name={id} stroke={colors.get(id)} strokeWidth={1.5} dot={false} isAnimationActive={false} />
          ))}
          {units.map(
            ([id, u]) =>
              u.reserveKw && (
                <Line key={reserveKey(id)} type="stepAfter" dataKey={reserveKey(id)} name={`${id} reserve`} stroke={colors.get(id)} strokeWidth={1} strokeDasharray="3 3" dot={false} isAnimationActive={false} />
              ),
          )}
        </LineChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
