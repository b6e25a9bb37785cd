import { useMemo } from 'react';
import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { legendProps, withUnit } from '@/components/chart-axes';
import { ChartFrame } from '@/components/chart-frame';
import { chartColors } from '@/lib/chart-colors';
import { bucketRows } from '../lib/chart-data';
import { storeUnit } from '../lib/level-points';
import { anyPriceKnown, marginalValuePoints, storeValueKey, type MarginalValuePoint } from '../lib/marginal-value-points';
import { stepLabel, timeAxisProps, timelineChartProps, valueAxisProps } from './time-axes';

function ValueChart({ title, dataKey, name, unit, data, color }: { title: string; dataKey: string; name: string; unit: string; data: MarginalValuePoint[]; color: string }) {
  const gaps = data.some((p) => p[dataKey] === null);
  // An empty plot would read as "worth nothing"; say instead that no price is known.
  if (!anyPriceKnown(data, dataKey)) {
    return (
      <ChartFrame title={title} note={unit} height={40}>
        <p className="flex h-full items-center justify-center text-[12px] text-ash-500">
          No price is known at any step: the pricing solve after the schedule did not finish in the run&apos;s time limit.
        </p>
      </ChartFrame>
    );
  }
  return (
    <ChartFrame title={title} note={gaps ? `${unit} · gaps: no price known` : unit} height={150}>
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} {...timelineChartProps}>
          <CartesianGrid stroke={chartColors.grid} vertical={false} />
          <XAxis {...timeAxisProps} />
          <YAxis {...valueAxisProps} />
          <ReferenceLine y={0} stroke={chartColors.grey} />
          <Tooltip labelFormatter={stepLabel} formatter={withUnit(unit, 4)} />
          <Legend {...legendProps} />
          <Line type="stepAfter" dataKey={dataKey} name={name} stroke={color} strokeWidth={1.5} dot={false} connectNulls={false} isAnimationActive={false} />
        </LineChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}

/**
 * The marginal value of energy, and of each store's product, per step: what one more kWh delivered
 * to the site (one more unit put into the store) would be worth at that step, with every on/off
 * decision held as scheduled. Drawn on the dispatch's time axis, under it.
 */
export function MarginalValueCharts({ schedule, stores }: { schedule: Schedule; stores: SiteSpec['stores'] }) {
  const data = useMemo(() => bucketRows(marginalValuePoints(schedule)), [schedule]);
  return (
    <>
      <ValueChart title="Marginal value of energy" dataKey="energy" name="Value of one more kWh" unit="money/kWh" data={data} color={chartColors.accentDeep} />
      {Object.keys(schedule.marginalValues.stores).map((id) => {
        const store = stores?.find((s) => s.id === id);
        const unit = storeUnit(store);
        return (
          <ValueChart
            key={id}
            title={`Marginal value of ${store?.product ?? 'the product'} · ${id}`}
            dataKey={storeValueKey(id)}
            name={`Value of one more ${unit} in ${id}`}
            unit={`money/${unit}`}
            data={data}
            color={chartColors.ink}
          />
        );
      })}
    </>
  );
}
