import { memo, useDeferredValue, useMemo } from 'react';
import { CartesianGrid, Legend, Line, LineChart, ReferenceArea, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { axisProps, compactNumber, legendProps, withUnit } from '@/components/chart-axes';
import { ChartFrame } from '@/components/chart-frame';
import { chartColors } from '@/lib/chart-colors';
import { formatNumber } from '@/lib/format';
import { unitCurves, type UnitCurve } from '../lib/unit-curves';

function shapeSentence(c: UnitCurve): string {
  if (c.source === 'single') return `One price over the whole range (${c.kind === 'generator' ? 'costPerKwh' : 'valuePerKwh'}).`;
  if (c.kind === 'generator') {
    return c.breaksShapeAt === null
      ? 'Convex: no slice is cheaper than the one before it, as the model needs.'
      : `Not convex: slice ${c.breaksShapeAt} is cheaper than slice ${c.breaksShapeAt - 1}, so the API refuses this curve.`;
  }
  return c.breaksShapeAt === null
    ? 'Concave: no slice is worth more than the one before it, as the model needs.'
    : `Not concave: slice ${c.breaksShapeAt} is worth more than slice ${c.breaksShapeAt - 1}, so the API refuses this curve.`;
}

const price = withUnit('money/kWh', 4);

/** One unit's incremental cost or value against its output, as steps, so convexity shows at a glance. */
const UnitCurveChart = memo(
  function UnitCurveChart({ curve: c }: { curve: UnitCurve }) {
    const priced = c.kind === 'generator' ? 'Cost' : 'Value';
    const maxKw = Math.max(c.ratingKw, c.endsAtKw);
    const prices = c.points.map((p) => p.price);
    const [lo, hi] = [Math.min(...prices), Math.max(...prices)];
    // Room around the prices, so a step of a few per cent between slices is plain to see; zero stays the floor of positive prices.
    const pad = (hi - lo) * 0.6 || Math.abs(hi) * 0.2 || 1;
    const priceDomain = [lo >= 0 ? Math.max(0, lo - pad) : lo - pad, hi + pad];
    return (
      <ChartFrame
        title={`Price curve · ${c.id}`}
        note="money/kWh by kW"
        height={130}
        caption={
          <>
            <p className={c.breaksShapeAt === null ? '' : 'font-medium text-red-800'}>{shapeSentence(c)}</p>
            {c.source === 'curve' && c.endsAtKw !== c.ratingKw && (
              <p className="font-medium text-red-800">
                The last slice ends at {formatNumber(c.endsAtKw)} kW, the rating is {formatNumber(c.ratingKw)} kW: they must agree.
              </p>
            )}
            {c.minStableKw > 0 && <p>Shaded: below the minimum stable load — the unit runs at 0 or from {formatNumber(c.minStableKw)} kW.</p>}
            {c.noLoadCostPerHour > 0 && <p>Plus a no-load cost of {formatNumber(c.noLoadCostPerHour)} money per hour on, at any output.</p>}
          </>
        }
      >
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={c.points} margin={{ top: 4, right: 12, bottom: 0, left: 0 }}>
            <CartesianGrid stroke={chartColors.grid} vertical={false} />
            <XAxis type="number" dataKey="kw" domain={[0, maxKw]} {...axisProps} tickFormatter={compactNumber} />
            <YAxis {...axisProps} width={48} tickFormatter={compactNumber} allowDataOverflow domain={priceDomain} />
            {c.minStableKw > 0 && <ReferenceArea x1={0} x2={Math.min(c.minStableKw, maxKw)} fill={chartColors.greyLight} fillOpacity={0.5} />}
            <ReferenceLine x={c.ratingKw} stroke={chartColors.grey} strokeDasharray="2 3" />
            <Tooltip labelFormatter={(kw) => `from ${formatNumber(Number(kw))} kW`} formatter={price} />
            <Legend {...legendProps} />
            <Line type="stepAfter" dataKey="price" name={`${priced} of the next kWh`} stroke={chartColors.accent} strokeWidth={2} dot={false} isAnimationActive={false} />
          </LineChart>
        </ResponsiveContainer>
      </ChartFrame>
    );
  },
  (a, b) => JSON.stringify(a.curve) === JSON.stringify(b.curve),
);

/**
 * The units' price curves beside the spec editor, redrawn as the JSON changes. `spec` is whatever the
 * editor's text parses to so far; the charts follow it a beat behind the typing.
 */
export function UnitCurvesPanel({ spec }: { spec: unknown }) {
  const deferred = useDeferredValue(spec);
  const curves = useMemo(() => unitCurves(deferred), [deferred]);
  if (curves.length === 0) return <p className="text-xs text-ash-500">No units in the spec yet: a generator or flexible load with a rating shows its price curve here.</p>;
  return (
    <div className="max-h-[40rem] space-y-2 overflow-y-auto" data-testid="unit-curves">
      {curves.map((c, i) => (
        <UnitCurveChart key={`${i}-${c.id}`} curve={c} />
      ))}
    </div>
  );
}
