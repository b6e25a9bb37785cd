import { useMemo } from 'react';
import { Area, CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { legendProps, withUnit } from '@/components/chart-axes';
import { ChartFrame } from '@/components/chart-frame';
import { chartColors } from '@/lib/chart-colors';
import { assetColors } from '../lib/asset-order';
import { formatNumber } from '@/lib/format';
import { bucketRows } from '../lib/chart-data';
import { reservePoints, reserveProviders } from '../lib/reserve-points';
import { stepLabel, timeAxisProps, timelineChartProps, valueAxisProps } from './time-axes';

/**
 * Spinning reserve per step (SPEC §5): what each provider holds, stacked, so the top of the stack
 * is the reserve held; the shortfall stacked on it, in the warning colour, reaches the requirement
 * wherever the fleet falls short; the requirement itself as a dashed line.
 */
export function ReserveChart({ schedule, spec, shortfallKwh }: { schedule: Schedule; spec: Pick<SiteSpec, 'units' | 'storage'> | undefined; shortfallKwh: number | undefined }) {
  const colors = useMemo(() => assetColors(schedule, spec), [schedule, spec]);
  const providers = useMemo(() => {
    const listed = reserveProviders(schedule);
    return [...colors.keys()].flatMap((id) => listed.filter((p) => p.id === id));
  }, [schedule, colors]);
  const points = useMemo(() => reservePoints(schedule), [schedule]);
  const data = useMemo(() => (points ? bucketRows(points) : []), [points]);
  if (!points) return null;
  const short = points.some((p) => p.shortfallKw > 0);
  return (
    <ChartFrame
      title="Spinning reserve: required vs held"
      note="kW"
      caption={
        short
          ? `Short of the requirement at ${points.filter((p) => p.shortfallKw > 0).length} steps, ${formatNumber(shortfallKwh)} kWh in all, at the reserve's penalty.`
          : 'The requirement is held at every step.'
      }
    >
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} {...timelineChartProps}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis {...timeAxisProps} />
          <YAxis {...valueAxisProps} />
          <Tooltip labelFormatter={stepLabel} formatter={withUnit('kW')} />
          <Legend {...legendProps} />
          {providers.map((p) => (
            <Area key={p.key} type="stepAfter" dataKey={p.key} name={`held by ${p.id}`} stackId="held" stroke={colors.get(p.id)} fill={colors.get(p.id)} fillOpacity={0.45} isAnimationActive={false} />
          ))}
          {short && <Area type="stepAfter" dataKey="shortfallKw" name="Shortfall" stackId="held" stroke={chartColors.danger} fill={chartColors.danger} fillOpacity={0.55} isAnimationActive={false} />}
          <Line type="stepAfter" dataKey="heldKw" name="Held in all" stroke={chartColors.accentDeep} strokeWidth={1} dot={false} isAnimationActive={false} />
          <Line type="stepAfter" dataKey="requiredKw" name="Required" stroke={chartColors.ink} strokeWidth={1.5} strokeDasharray="5 3" dot={false} isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
