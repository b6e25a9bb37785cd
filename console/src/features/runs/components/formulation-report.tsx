import { useMemo } from 'react';
import { Bar, BarChart, CartesianGrid, Cell, ReferenceArea, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { ModelReport } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { Table, Td, Th } from '@/components/data-table';
import { Panel } from '@/components/page-header';
import { chartColors } from '@/lib/chart-colors';
import { formatNumber, formatPercent, formatSeconds } from '@/lib/format';
import { bigMKindCounts, classifyBigM } from '../lib/big-m-kinds';
import { coefficientBars, HEALTHY_BAND, HEALTHY_ORDERS } from '../lib/chart-data';
import { storeUnit } from '../lib/level-points';

const pow10 = (n: number) => `1e${n}`;

function Stat({ label, value }: { label: string; value: string | number }) {
  return (
    <div className="flex justify-between gap-3 border-b border-ash-100 py-1 text-[13px] last:border-0">
      <dt className="text-ash-600">{label}</dt>
      <dd className="font-mono">{value}</dd>
    </div>
  );
}

function CoefficientRangeChart({ model }: { model: ModelReport }) {
  const bars = useMemo(() => coefficientBars(model.coefficientRange), [model]);
  const lo = Math.floor(Math.min(Math.log10(HEALTHY_BAND[0]) - 1, ...bars.map((b) => b.span[0])));
  const hi = Math.ceil(Math.max(Math.log10(HEALTHY_BAND[1]) + 1, ...bars.map((b) => b.span[1])));
  const ticks = Array.from({ length: hi - lo + 1 }, (_, i) => lo + i);
  // A bar whose ends coincide would be invisible; give it a sliver of width on the log axis.
  const data = bars.map((b) => ({ ...b, drawn: b.span[1] - b.span[0] < 0.05 ? [b.span[0] - 0.05, b.span[1] + 0.05] : b.span }));
  return (
    <figure aria-label="Coefficient ranges on a log scale">
      <div style={{ height: 40 + data.length * 34 }}>
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={data} layout="vertical" margin={{ top: 4, right: 12, bottom: 4, left: 0 }}>
            <CartesianGrid stroke={chartColors.grid} horizontal={false} />
            <ReferenceArea x1={Math.log10(HEALTHY_BAND[0])} x2={Math.log10(HEALTHY_BAND[1])} fill={chartColors.greyLight} fillOpacity={0.45} label={{ value: 'healthy band', position: 'insideTopRight', fontSize: 10, fill: '#6b6761' }} />
            <XAxis type="number" domain={[lo, hi]} ticks={ticks} tickFormatter={pow10} tick={{ fontSize: 10, fill: '#6b6761' }} />
            <YAxis type="category" dataKey="name" width={70} tick={{ fontSize: 11, fill: '#3f3c38' }} />
            <Tooltip
              formatter={(_v, _n, item) => {
                const b = item.payload as (typeof data)[number];
                return [`${b.min.toExponential(2)} … ${b.max.toExponential(2)} (${b.orders} orders)`, 'range'];
              }}
            />
            <Bar dataKey="drawn" barSize={14} isAnimationActive={false}>
              {data.map((b) => (
                <Cell key={b.name} fill={b.healthy ? chartColors.ink : chartColors.accent} />
              ))}
            </Bar>
          </BarChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-1 text-[11px] text-ash-500">
        Each bar spans the smallest to the largest absolute non-zero coefficient after scaling. Shaded: {HEALTHY_BAND[0].toExponential(0)} … {HEALTHY_BAND[1].toExponential(0)}
        {' '}and at most {HEALTHY_ORDERS} orders per family; bars in the accent colour fall outside it.
      </figcaption>
    </figure>
  );
}

/** A rolling solve's proof of quality: the bound on the whole horizon and the gap it leaves, or why there is none. */
function HorizonBoundStats({ bound }: { bound: NonNullable<ModelReport['horizonBound']> }) {
  if (bound.reason !== null || bound.bound === null) return <Stat label="Horizon bound" value={`none: ${bound.reason ?? 'unknown'}`} />;
  return (
    <>
      <Stat label="Horizon bound" value={formatNumber(bound.bound, 2)} />
      <Stat label="Proven gap" value={bound.gap === null ? '—' : formatPercent(bound.gap, 3)} />
      <Stat label="Bound blocks" value={`${bound.blocks} (${formatSeconds(bound.solveSeconds)})`} />
    </>
  );
}

/**
 * The internal units `scaling` chose (1 each when it is off): power, money, each store in its own
 * unit, and the demand-charge peaks (SPEC §5 keeps store levels and peaks near order one too).
 */
function InternalUnits({ scale, spec }: { scale: ModelReport['scale']; spec: SiteSpec | undefined }) {
  const stores = Object.entries(scale.stores);
  return (
    <>
      <Stat label="Internal units" value={`${formatNumber(scale.powerKw)} kW · ${formatNumber(scale.money)} money`} />
      {stores.map(([id, factor]) => (
        <Stat key={id} label={`Internal unit · ${id}`} value={`${formatNumber(factor)} ${storeUnit(spec?.stores?.find((s) => s.id === id))}`} />
      ))}
      {(spec?.grid?.demandCharges?.length ?? 0) > 0 && <Stat label="Internal unit · demand-charge peaks" value={`${formatNumber(scale.demandPeakKw)} kW`} />}
    </>
  );
}

function BigMPanel({ model }: { model: ModelReport }) {
  const rows = useMemo(() => classifyBigM(model.bigM), [model]);
  const kinds = useMemo(() => bigMKindCounts(rows), [rows]);
  return (
    <Panel title={`Big-M values (${model.bigM.length})`} className="lg:col-span-3">
      {rows.length === 0 ? (
        <p className="text-sm text-ash-500">This model uses no big-M constraint.</p>
      ) : (
        <div className="grid gap-3 md:grid-cols-[minmax(0,1fr)_minmax(0,2fr)]">
          <dl className="space-y-1 text-[12px]" aria-label="Big-M kinds">
            {kinds.map((k) => (
              <div key={k.id}>
                <dt className="inline font-medium text-ash-800">
                  {k.label} ({k.count})
                </dt>
                <dd className="inline text-ash-600"> — {k.bounds}</dd>
              </div>
            ))}
          </dl>
          <div className="max-h-72 overflow-y-auto">
            <Table label="Big-M values">
              <thead>
                <tr>
                  <Th>Kind</Th>
                  <Th>Where</Th>
                  <Th className="text-right">Value (kW)</Th>
                </tr>
              </thead>
              <tbody>
                {rows.map((m) => (
                  <tr key={m.where}>
                    <Td className="whitespace-nowrap text-xs">{m.kindLabel}</Td>
                    <Td className="font-mono text-xs">{m.where}</Td>
                    <Td className="text-right font-mono text-xs">{formatNumber(m.value)}</Td>
                  </tr>
                ))}
              </tbody>
            </Table>
          </div>
        </div>
      )}
    </Panel>
  );
}

export function FormulationReport({ model, spec }: { model: ModelReport; spec?: SiteSpec }) {
  const reductions = Object.entries(model.reductions);
  return (
    <div className="grid gap-3 lg:grid-cols-3" data-testid="formulation-report">
      <Panel title="Model size">
        <dl>
          <Stat label="Mode" value={model.mode} />
          {model.mode === 'rolling' && <Stat label="Parallel segments" value={model.segments} />}
          {model.horizonBound && <HorizonBoundStats bound={model.horizonBound} />}
          <Stat label="Variables" value={formatNumber(model.variables, 0)} />
          <Stat label="Binaries (after pruning)" value={formatNumber(model.binaries, 0)} />
          <Stat label="Binaries pruned" value={formatNumber(model.binariesPruned, 0)} />
          <Stat label="Binaries before pruning" value={formatNumber(model.binaries + model.binariesPruned, 0)} />
          <Stat label="Constraints" value={formatNumber(model.constraints, 0)} />
          <Stat label="Nonzeros" value={formatNumber(model.nonzeros, 0)} />
          <Stat label="Build" value={formatSeconds(model.buildSeconds)} />
          <Stat label="Solver time (summed)" value={formatSeconds(model.solveSeconds)} />
          <Stat label="Solver" value={`${model.solver.name} ${model.solver.version}`} />
          {model.scale && <InternalUnits scale={model.scale} spec={spec} />}
        </dl>
        <ul className="mt-2 flex flex-wrap gap-1" aria-label="Reductions">
          {reductions.map(([name, on]) => (
            <li key={name} className={`rounded px-1.5 py-0.5 font-mono text-[11px] ${on ? 'bg-ash-900 text-white' : 'bg-ash-100 text-ash-500 line-through'}`}>
              {name}
            </li>
          ))}
        </ul>
      </Panel>
      <Panel title="Coefficient ranges" className="lg:col-span-2">
        <CoefficientRangeChart model={model} />
      </Panel>
      <BigMPanel model={model} />
      <Panel title={`Windows (${model.windows.length})`} className="lg:col-span-3">
        <div className="max-h-72 overflow-y-auto">
          <Table label="Rolling windows">
            <thead>
              <tr>
                <Th>#</Th>
                <Th>Kind</Th>
                <Th className="text-right">From step</Th>
                <Th className="text-right">To step</Th>
                <Th className="text-right">Committed</Th>
                <Th>Outcome</Th>
                <Th className="text-right">Gap</Th>
                <Th className="text-right">Blocks</Th>
                <Th className="text-right">Solve time</Th>
              </tr>
            </thead>
            <tbody>
              {model.windows.map((w, i) => (
                <tr key={`${w.kind}-${w.fromStep}`}>
                  <Td className="font-mono text-xs text-ash-500">{i + 1}</Td>
                  <Td className="text-xs">{w.kind === 'seam-probe' ? 'seam probe' : 'window'}</Td>
                  <Td className="text-right font-mono text-xs">{w.fromStep}</Td>
                  <Td className="text-right font-mono text-xs">{w.toStep}</Td>
                  <Td className="text-right font-mono text-xs">{w.committedSteps}</Td>
                  <Td className="text-xs">{w.outcome}</Td>
                  <Td className="text-right font-mono text-xs">{formatPercent(w.gap, 3)}</Td>
                  <Td className="text-right font-mono text-xs">{w.blocks}</Td>
                  <Td className="text-right font-mono text-xs">{formatSeconds(w.solveSeconds)}</Td>
                </tr>
              ))}
            </tbody>
          </Table>
        </div>
      </Panel>
    </div>
  );
}
