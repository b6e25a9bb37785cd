import { useState } from 'react';
import { Bar, CartesianGrid, ComposedChart, Legend, Line, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { ComparisonRow, StudyComparison } from '@gridwright/shared/studies';
import { AdvisoryNote } from '@/components/advisory-note';
import { SelectField } from '@/components/field';
import { Table, Td, Th } from '@/components/data-table';
import { OpenRunLink } from '@/components/open-run-link';
import { StatusPill } from '@/components/status-pill';
import { chartColors, seriesPalette } from '@/lib/chart-colors';
import { OBJECTIVE_TERMS } from '@/lib/objective-terms';
import { formatSolverFigure } from '@/lib/solver-figures';
import { valueLabel } from '../lib/grid-form';

const tick = { fontSize: 11, fill: '#6b6761' };

const combinationName = (c: StudyComparison, values: unknown[]) => c.changes.map((ch, i) => `${ch.label}=${valueLabel(values[i])}`).join(', ');

/** Objective and its terms per combination: the terms stacked (values up, costs down), the objective as a dot. */
function ComparisonChart({ comparison }: { comparison: StudyComparison }) {
  const data = comparison.rows
    .filter((r) => r.objective !== null)
    .map((r) => ({ name: combinationName(comparison, r.values), objective: r.objective, ...r.objectiveTerms }));
  const used = OBJECTIVE_TERMS.filter((t) => data.some((d) => Math.abs((d[t.key] as number | undefined) ?? 0) > 1e-9));
  return (
    <figure className="rounded-lg border border-ash-200 bg-white p-3" aria-label="Objective and its terms by combination">
      <figcaption className="mb-2 flex items-baseline justify-between text-[13px] font-semibold text-ash-800">
        <span>Objective and its terms by combination</span>
        <span className="text-[11px] font-normal text-ash-500">money in the tenant's currency; value +, cost −</span>
      </figcaption>
      <div style={{ height: 260 }}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={data} stackOffset="sign" margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
            <CartesianGrid stroke={chartColors.grid} vertical={false} />
            <XAxis dataKey="name" tick={tick} interval={0} height={40} />
            <YAxis width={56} tick={tick} />
            <ReferenceLine y={0} stroke={chartColors.grey} />
            <Tooltip formatter={(v) => formatSolverFigure(Number(v))} />
            <Legend wrapperStyle={{ fontSize: 11 }} />
            {used.map((t, i) => (
              <Bar key={t.key} dataKey={t.key} name={t.label} stackId="terms" fill={seriesPalette[(i + 1) % seriesPalette.length]} fillOpacity={0.75} isAnimationActive={false} />
            ))}
            <Line dataKey="objective" name="Objective" stroke={chartColors.accent} strokeWidth={0} dot={{ r: 5, fill: chartColors.accent }} legendType="circle" isAnimationActive={false} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}

interface Metric {
  id: string;
  label: string;
  unit: string;
  of: (row: ComparisonRow) => number | null;
}

/** The energy and equipment figures a study compares besides money, each a chart of its own. */
function metricsOf(charges: string[]): Metric[] {
  return [
    { id: 'import', label: 'Energy imported', unit: 'kWh', of: (r) => r.importKwh },
    { id: 'export', label: 'Energy exported', unit: 'kWh', of: (r) => r.exportKwh },
    { id: 'curtailed', label: 'Supply curtailed', unit: 'kWh', of: (r) => r.curtailedKwh },
    { id: 'unserved', label: 'Load unserved', unit: 'kWh', of: (r) => r.unservedKwh },
    { id: 'starts', label: 'Unit starts', unit: 'starts', of: (r) => r.starts },
    ...charges.map((c) => ({ id: `peak:${c}`, label: `Demand-charge peak, ${c}`, unit: 'kW', of: (r: ComparisonRow) => r.demandChargePeaks[c] ?? null })),
  ];
}

/** One figure per combination, chosen from the list: imports, curtailment, starts, peaks. */
function MetricChart({ comparison, metrics }: { comparison: StudyComparison; metrics: Metric[] }) {
  const [chosen, setChosen] = useState(metrics[0].id);
  const metric = metrics.find((m) => m.id === chosen) ?? metrics[0];
  const data = comparison.rows.filter((r) => r.objective !== null).map((r) => ({ name: combinationName(comparison, r.values), value: metric.of(r) }));
  return (
    <figure className="rounded-lg border border-ash-200 bg-white p-3" aria-label="Energy and equipment figures by combination">
      <figcaption className="mb-2 flex flex-wrap items-end justify-between gap-2 text-[13px] font-semibold text-ash-800">
        <span>
          {metric.label} by combination <span className="text-[11px] font-normal text-ash-500">({metric.unit})</span>
        </span>
        <SelectField label="Figure" className="w-64 font-normal" value={metric.id} onChange={(e) => setChosen(e.target.value)}>
          {metrics.map((m) => (
            <option key={m.id} value={m.id}>
              {m.label} ({m.unit})
            </option>
          ))}
        </SelectField>
      </figcaption>
      <div style={{ height: 220 }}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={data} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
            <CartesianGrid stroke={chartColors.grid} vertical={false} />
            <XAxis dataKey="name" tick={tick} interval={0} height={40} />
            <YAxis width={64} tick={tick} />
            <Tooltip formatter={(v) => `${formatSolverFigure(Number(v))} ${metric.unit}`} />
            <Bar dataKey="value" name={`${metric.label} (${metric.unit})`} fill={chartColors.ink} fillOpacity={0.8} isAnimationActive={false} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}

/** The study's runs side by side: a table of every figure, a chart of the money and one of the other figures. */
export function ComparisonView({ comparison }: { comparison: StudyComparison }) {
  const charges = [...new Set(comparison.rows.flatMap((r) => Object.keys(r.demandChargePeaks)))];
  const anySchedule = comparison.rows.some((r) => r.objective !== null);
  return (
    <div className="space-y-3">
      {anySchedule && (
        <div className="grid gap-3 2xl:grid-cols-2">
          <ComparisonChart comparison={comparison} />
          <MetricChart comparison={comparison} metrics={metricsOf(charges)} />
        </div>
      )}
      <Table label="Comparison">
        <thead>
          <tr>
            {comparison.changes.map((c) => (
              <Th key={c.pointer}>{c.label}</Th>
            ))}
            <Th>Status</Th>
            <Th className="text-right">Objective</Th>
            {OBJECTIVE_TERMS.map((t) => (
              <Th key={t.key} className="text-right">
                {t.label}
              </Th>
            ))}
            <Th className="text-right">Import kWh</Th>
            <Th className="text-right">Export kWh</Th>
            <Th className="text-right">Curtailed kWh</Th>
            <Th className="text-right">Unserved kWh</Th>
            <Th className="text-right">Unit starts</Th>
            {charges.map((c) => (
              <Th key={c} className="text-right">
                Peak {c} kW
              </Th>
            ))}
            <Th>Run</Th>
          </tr>
        </thead>
        <tbody>
          {comparison.rows.map((r) => (
            <tr key={r.position} className={r.position === comparison.best ? 'bg-kiln-50' : 'hover:bg-ash-50'}>
              {r.values.map((v, i) => (
                <Td key={i} className="font-mono text-xs">
                  {valueLabel(v)}
                </Td>
              ))}
              <Td>
                <StatusPill status={r.status} />
                {r.position === comparison.best && <span className="ml-1.5 text-[11px] font-semibold text-kiln-700">best</span>}
              </Td>
              <Td className="text-right font-mono text-xs font-semibold">{formatSolverFigure(r.objective)}</Td>
              {OBJECTIVE_TERMS.map((t) => (
                <Td key={t.key} className="text-right font-mono text-xs">
                  {formatSolverFigure(r.objectiveTerms?.[t.key])}
                </Td>
              ))}
              <Td className="text-right font-mono text-xs">{formatSolverFigure(r.importKwh)}</Td>
              <Td className="text-right font-mono text-xs">{formatSolverFigure(r.exportKwh)}</Td>
              <Td className="text-right font-mono text-xs">{formatSolverFigure(r.curtailedKwh)}</Td>
              <Td className="text-right font-mono text-xs">{formatSolverFigure(r.unservedKwh)}</Td>
              <Td className="text-right font-mono text-xs">{r.starts ?? '—'}</Td>
              {charges.map((c) => (
                <Td key={c} className="text-right font-mono text-xs">
                  {formatSolverFigure(r.demandChargePeaks[c])}
                </Td>
              ))}
              <Td>
                <OpenRunLink runId={r.runId} />
              </Td>
            </tr>
          ))}
        </tbody>
      </Table>
      <AdvisoryNote />
    </div>
  );
}
