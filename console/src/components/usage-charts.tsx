import { useMemo } from 'react';
import { Bar, CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { chartColors } from '@/lib/chart-colors';
import type { Schemas } from '@/lib/api-client';
import { axisUnit, legendProps, tickNumber, withUnit } from '@/components/chart-axes';
import { formatNumber, formatPercent } from '@/lib/format';
import { usagePoints } from '@/lib/usage-series';

type Usage = Schemas['UsageReport'];
const tick = { fontSize: 11, fill: '#6b6761' };
const day = (d: unknown) => String(d).slice(8, 10);

function QuotaChart({ title, usage, kind }: { title: string; usage: Usage; kind: 'runs' | 'solverSeconds' }) {
  const quota = usage.quota[kind];
  const data = useMemo(
    () => usagePoints(usage.days, { runs: usage.quota.runs.limit, solverSeconds: usage.quota.solverSeconds.limit }, new Date().toISOString().slice(0, 10)),
    [usage],
  );
  const toDate = kind === 'runs' ? 'runsToDate' : 'solverSecondsToDate';
  const pace = kind === 'runs' ? 'runsPace' : 'solverSecondsPace';
  const unit = kind === 'runs' ? 'runs' : 'solver-s';
  return (
    <figure className="min-w-0 rounded-lg border border-ash-200 bg-white p-3" aria-label={title}>
      <figcaption className="mb-2 flex items-baseline justify-between">
        <span className="text-[13px] font-semibold">{title}</span>
        <span className="font-mono text-xs text-ash-600">
          {formatNumber(quota.used)} / {formatNumber(quota.limit, 0)} · {formatPercent(quota.share, 1)}
        </span>
      </figcaption>
      <div className="mb-2 h-2 overflow-hidden rounded-full bg-ash-100" role="meter" aria-label={`${title} used`} aria-valuemin={0} aria-valuemax={quota.limit} aria-valuenow={quota.used}>
        <div className={`h-full ${quota.share >= 0.9 ? 'bg-red-600' : 'bg-kiln-500'}`} style={{ width: `${Math.min(100, quota.share * 100)}%` }} />
      </div>
      <div style={{ height: 200 }}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={data} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
            <CartesianGrid stroke={chartColors.grid} vertical={false} />
            <XAxis dataKey="date" tickFormatter={day} tick={tick} tickLine={false} />
            <YAxis yAxisId="day" width={52} tick={tick} tickFormatter={tickNumber} label={axisUnit(`${unit} per day`)} />
            <YAxis yAxisId="total" orientation="right" width={56} tick={tick} tickFormatter={tickNumber} label={{ ...axisUnit(`${unit} this month`), angle: 90, position: 'insideRight' }} />
            <Tooltip formatter={withUnit(unit, 2)} />
            <Legend {...legendProps} />
            <Bar yAxisId="day" dataKey={kind} name="per day" fill={chartColors.greyLight} isAnimationActive={false} />
            <Line yAxisId="total" dataKey={toDate} name="month to date" stroke={chartColors.accent} strokeWidth={2} dot={false} isAnimationActive={false} />
            <Line yAxisId="total" dataKey={pace} name="even pace to quota" stroke={chartColors.grey} strokeDasharray="4 3" dot={false} isAnimationActive={false} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}

export function UsageCharts({ usage }: { usage: Usage }) {
  return (
    <div className="grid gap-3 xl:grid-cols-2" data-testid="usage-charts">
      <QuotaChart title="Runs" usage={usage} kind="runs" />
      <QuotaChart title="Solver-seconds" usage={usage} kind="solverSeconds" />
    </div>
  );
}

export const limitLabels: Record<keyof Schemas['Limits'], string> = {
  monthlyRuns: 'Runs per month',
  monthlySolverSeconds: 'Solver-seconds per month',
  maxSteps: 'Steps per run',
  maxUnits: 'Units per run',
  requestsPerSecond: 'Requests per second (per credential)',
  concurrentRuns: 'Runs solving at once',
  webhookEndpoints: 'Webhook endpoints',
};

export function LimitsList({ limits, overrides }: { limits: Schemas['Limits']; overrides?: Record<string, unknown> }) {
  return (
    <dl className="text-[13px]">
      {(Object.keys(limitLabels) as (keyof Schemas['Limits'])[]).map((k) => (
        <div key={k} className="flex justify-between gap-3 border-b border-ash-100 py-1 last:border-0">
          <dt className="text-ash-600">{limitLabels[k]}</dt>
          <dd className="font-mono">
            {formatNumber(limits[k], 0)}
            {overrides && overrides[k] !== undefined && <span className="ml-1 text-[10px] text-kiln-700">override</span>}
          </dd>
        </div>
      ))}
    </dl>
  );
}
