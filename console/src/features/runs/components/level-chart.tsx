import { useMemo } from 'react';
import { Bar, CartesianGrid, ComposedChart, Legend, Line, ReferenceArea, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { axisProps, compactNumber, legendProps, withUnit } from '@/components/chart-axes';
import { ChartFrame } from '@/components/chart-frame';
import { chartColors } from '@/lib/chart-colors';
import { formatNumber } from '@/lib/format';
import { bucketRows } from '../lib/chart-data';
import { socPoints, storePoints, storeUnit, type LevelPoint } from '../lib/level-points';
import { stepLabel, timeAxisProps, timelineChartProps, valueAxisProps } from './time-axes';

interface LevelChartProps {
  title: string;
  /** What the level is counted in: kWh for a battery, the store's own unit for a store. */
  unit: string;
  levelName: string;
  points: LevelPoint[];
}

/**
 * A level between its limits: the minimum and the capacity as dashed lines (the zone below the
 * minimum shaded), the final target as a marker at the last step, and — for a store — shortfall
 * and spill per hour as bars on their own axis wherever they are not zero.
 */
function LevelChart({ title, unit, levelName, points }: LevelChartProps) {
  const data = useMemo(() => bucketRows(points), [points]);
  const { min, capacity } = points[0] ?? { min: 0, capacity: 0 };
  const final = points[points.length - 1]?.final ?? null;
  const hasShortfall = points.some((p) => p.shortfall > 0);
  const hasSpill = points.some((p) => p.spill > 0);
  const flows = hasShortfall || hasSpill;
  const level = withUnit(unit);
  const perHour = withUnit(`${unit}/h`);
  return (
    <ChartFrame
      title={title}
      note={`${unit} · limits ${formatNumber(min)}–${formatNumber(capacity)}${final !== null ? ` · final ≥ ${formatNumber(final)}` : ''}`}
      height={190}
    >
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} {...timelineChartProps} margin={{ ...timelineChartProps.margin, right: flows ? 0 : 12 }}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis {...timeAxisProps} />
          <YAxis yAxisId="level" {...valueAxisProps} domain={[0, capacity]} />
          {flows && <YAxis yAxisId="flow" orientation="right" {...axisProps} width={48} tickFormatter={compactNumber} />}
          {/* The forbidden zone below the minimum is shaded, so a schedule hugging it is obvious. */}
          {min > 0 && <ReferenceArea yAxisId="level" y1={0} y2={min} fill={chartColors.greyLight} fillOpacity={0.5} />}
          <Tooltip labelFormatter={stepLabel} formatter={(v, _n, item) => (item.dataKey === 'shortfall' || item.dataKey === 'spill' ? perHour(v) : level(v))} />
          <Legend {...legendProps} />
          <Line yAxisId="level" type="linear" dataKey="level" name={levelName} stroke={chartColors.accent} strokeWidth={2} dot={false} isAnimationActive={false} />
          <Line yAxisId="level" type="linear" dataKey="capacity" name="Capacity" stroke={chartColors.grey} strokeDasharray="2 3" dot={false} isAnimationActive={false} />
          <Line yAxisId="level" type="linear" dataKey="min" name="Minimum" stroke={chartColors.grey} strokeDasharray="6 3" dot={false} isAnimationActive={false} />
          {final !== null && (
            <Line yAxisId="level" dataKey="final" name="Final target" stroke={chartColors.ink} dot={{ r: 4, fill: chartColors.ink }} legendType="circle" isAnimationActive={false} />
          )}
          {hasShortfall && <Bar yAxisId="flow" dataKey="shortfall" name={`Shortfall ${unit}/h`} fill={chartColors.danger} isAnimationActive={false} />}
          {hasSpill && <Bar yAxisId="flow" dataKey="spill" name={`Spill ${unit}/h`} fill={chartColors.grey} isAnimationActive={false} />}
        </ComposedChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}

type StorageSpec = NonNullable<SiteSpec['storage']>[number];
type StoreSpec = NonNullable<SiteSpec['stores']>[number];

export function StorageLevelChart({ schedule, storage }: { schedule: Schedule; storage: StorageSpec }) {
  const points = useMemo(() => socPoints(schedule, storage), [schedule, storage]);
  return <LevelChart title={`State of charge · ${storage.id}`} unit="kWh" levelName="SOC" points={points} />;
}

export function StoreLevelChart({ schedule, store }: { schedule: Schedule; store: StoreSpec }) {
  const points = useMemo(() => storePoints(schedule, store), [schedule, store]);
  const product = store.product ? ` (${store.product})` : '';
  return <LevelChart title={`Store level · ${store.id}${product}`} unit={storeUnit(store)} levelName="Level" points={points} />;
}
