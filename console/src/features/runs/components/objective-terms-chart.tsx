import { useMemo } from 'react';
import { Bar, BarChart, CartesianGrid, Cell, LabelList, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis, type LabelProps } from 'recharts';
import type { ObjectiveTerms } from '@gridwright/shared/run-result';
import { axisProps, compactNumber } from '@/components/chart-axes';
import { ChartFrame } from '@/components/chart-frame';
import { chartColors } from '@/lib/chart-colors';
import { formatNumber } from '@/lib/format';
import { objectiveTermBars, termMeanings, type ObjectiveTermBar } from '../lib/objective-term-bars';

const fill: Record<ObjectiveTermBar['sign'], string> = { value: chartColors.accent, cost: chartColors.grey, total: chartColors.ink };
const legend: [ObjectiveTermBar['sign'], string][] = [
  ['value', 'value earned (positive)'],
  ['cost', 'cost (negative)'],
  ['total', 'objective: their sum'],
];

/** Zero always in view, and room beyond the longest bar on each side for its label. */
const axisDomain: [(min: number) => number, (max: number) => number] = [(min) => Math.min(0, min * 1.35), (max) => Math.max(0, max * 1.35)];

/** The figure at the end of a bar, outside it: to the right of a value, to the left of a cost. */
function BarEndLabel(props: LabelProps) {
  const value = Number(props.value);
  const x = Number(props.x ?? 0);
  const width = Number(props.width ?? 0);
  const y = Number(props.y ?? 0) + Number(props.height ?? 0) / 2;
  if (value === 0) return null;
  const end = value < 0 ? Math.min(x, x + width) - 4 : Math.max(x, x + width) + 4;
  return (
    <text x={end} y={y} dy="0.35em" textAnchor={value < 0 ? 'end' : 'start'} fontSize={11} fill={chartColors.ink}>
      {formatNumber(value)}
    </text>
  );
}

/** Where the money goes: each term of the objective as a signed bar, then the objective they sum to. */
export function ObjectiveTermsChart({ terms, objective }: { terms: ObjectiveTerms; objective: number | null }) {
  const bars = useMemo(() => objectiveTermBars(terms, objective), [terms, objective]);
  return (
    <ChartFrame
      title="Where the money goes: objective terms"
      note="money"
      height={bars.length * 30 + 24}
      caption={
        <>
          <ul className="mb-1 flex flex-wrap gap-x-3 gap-y-0.5" aria-label="Legend">
            {legend.map(([sign, label]) => (
              <li key={sign} className="flex items-center gap-1">
                <span className="inline-block h-2.5 w-2.5 rounded-sm" style={{ background: fill[sign] }} aria-hidden="true" />
                {label}
              </li>
            ))}
          </ul>
          Money is in the tenant&apos;s currency, the one the spec&apos;s prices are written in. Each bar is a signed contribution to the
          objective: value earned counts positive, cost negative, and together they add up to the objective,{' '}
          <span className="font-mono">{formatNumber(bars[bars.length - 1].value)}</span>.
        </>
      }
    >
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={bars} layout="vertical" margin={{ top: 0, right: 8, bottom: 0, left: 0 }}>
          <CartesianGrid stroke={chartColors.grid} horizontal={false} />
          <XAxis type="number" {...axisProps} tickFormatter={compactNumber} domain={axisDomain} />
          <YAxis type="category" dataKey="label" width={112} {...axisProps} />
          <ReferenceLine x={0} stroke={chartColors.ink} />
          <Tooltip
            cursor={{ fill: chartColors.grid }}
            formatter={(v, _n, item) => [`${formatNumber(Number(v))} money`, termMeanings[(item.payload as ObjectiveTermBar).key]]}
          />
          <Bar dataKey="value" name="money" barSize={16} isAnimationActive={false}>
            {bars.map((b) => (
              <Cell key={b.key} fill={fill[b.sign]} />
            ))}
            <LabelList dataKey="value" content={BarEndLabel} />
          </Bar>
        </BarChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
