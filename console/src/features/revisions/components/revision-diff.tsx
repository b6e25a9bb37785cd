import { useMemo, useState } from 'react';
import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { RevisionDiff } from '@gridwright/shared/revisions';
import { AdvisoryNote } from '@/components/advisory-note';
import { Table, Td, Th } from '@/components/data-table';
import { Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { Loading } from '@/components/states';
import { chartColors } from '@/lib/chart-colors';
import { formatDateTime, formatNumber } from '@/lib/format';
import { OBJECTIVE_TERMS } from '@/lib/objective-terms';
import { formatSolverChange, formatSolverFigure } from '@/lib/solver-figures';
import { useRevisionDiff } from '../api';
import { changedFirst, changedSteps, setpointPoints } from '../lib/diff-rows';

const STEP_ROWS = 200;
const tick = { fontSize: 11, fill: '#6b6761' };


function ObjectiveTable({ diff }: { diff: RevisionDiff }) {
  const { base, revision, change } = diff.objective;
  return (
    <Table label="Objective terms compared">
      <thead>
        <tr>
          <Th>Term (value +, cost −)</Th>
          <Th className="text-right">Compared revision</Th>
          <Th className="text-right">This run</Th>
          <Th className="text-right">Change</Th>
        </tr>
      </thead>
      <tbody>
        {OBJECTIVE_TERMS.map(({ key: term, label, covers }) => (
          <tr key={term}>
            <Td>
              {label} <span className="text-xs text-ash-500">({covers})</span>
            </Td>
            <Td className="text-right font-mono text-xs">{formatSolverFigure(base.terms[term])}</Td>
            <Td className="text-right font-mono text-xs">{formatSolverFigure(revision.terms[term])}</Td>
            <Td className="text-right font-mono text-xs">{formatSolverChange(change.terms[term])}</Td>
          </tr>
        ))}
        <tr className="font-semibold">
          <Td>Objective over these steps</Td>
          <Td className="text-right font-mono text-xs">{formatSolverFigure(base.total)}</Td>
          <Td className="text-right font-mono text-xs">{formatSolverFigure(revision.total)}</Td>
          <Td className="text-right font-mono text-xs" >
            <span data-testid="objective-change">{formatSolverChange(change.total)}</span>
          </Td>
        </tr>
      </tbody>
    </Table>
  );
}

/**
 * What changed between this run and another revision of its chain, over the steps both cover: the
 * objective terms (both schedules priced by the later revision's spec) and each setpoint step by step.
 */
export function RevisionDiffPanel({ runId, baseId }: { runId: string; baseId: string }) {
  const diff = useRevisionDiff(runId, baseId);
  const ordered = useMemo(() => (diff.data ? changedFirst(diff.data.setpoints) : []), [diff.data]);
  const [picked, setPicked] = useState<string | null>(null);
  if (diff.isPending) return <Loading label="Comparing the revisions…" />;
  if (diff.error) return <ProblemAlert error={diff.error} />;
  const d = diff.data;
  const changed = ordered.filter((s) => s.changedSteps > 0);
  const selected = ordered.find((s) => s.key === picked) ?? changed[0] ?? ordered[0];
  const { points, sampled } = selected ? setpointPoints(d, selected) : { points: [], sampled: false };
  const rows = selected ? changedSteps(d, selected, STEP_ROWS) : [];
  return (
    <div className="space-y-3" data-testid="revision-diff">
      <p className="text-xs text-ash-500">
        Over the {d.timestamps.length} steps both cover, from {formatDateTime(d.timestamps[0])} (step {d.fromRootStep} of the first plan). Both schedules are priced by the
        spec of the revision that starts later: its measured state, prices and peaks so far.
      </p>
      <ObjectiveTable diff={d} />
      <Panel title={`Setpoints: ${changed.length} of ${ordered.length} changed`}>
        <div className="grid gap-3 xl:grid-cols-[18rem_minmax(0,1fr)]">
          <ul aria-label="Setpoints" className="max-h-80 space-y-0.5 overflow-y-auto text-[13px]">
            {ordered.map((s) => (
              <li key={s.key}>
                <button
                  type="button"
                  onClick={() => setPicked(s.key)}
                  aria-pressed={selected?.key === s.key}
                  className={`flex w-full items-baseline justify-between gap-2 rounded px-2 py-1 text-left ${selected?.key === s.key ? 'bg-kiln-50 text-kiln-800' : 'hover:bg-ash-50'} ${s.changedSteps ? '' : 'text-ash-400'}`}
                >
                  <span className="truncate font-mono text-xs">{s.key}</span>
                  <span className="whitespace-nowrap text-[11px]">{s.changedSteps ? `${s.changedSteps} steps, up to ${formatNumber(s.largestChange)} ${s.unit}` : 'unchanged'}</span>
                </button>
              </li>
            ))}
          </ul>
          {selected && (
            <div className="min-w-0 space-y-2">
              <figure className="rounded-lg border border-ash-200 p-2" aria-label={`${selected.key}: compared revision and this run`}>
                <figcaption className="mb-1 flex justify-between text-[13px] font-semibold text-ash-800">
                  <span>{selected.key}</span>
                  <span className="text-[11px] font-normal text-ash-500">{selected.unit}{sampled ? ', every few steps' : ''}</span>
                </figcaption>
                <div style={{ height: 200 }}>
                  <ResponsiveContainer width="100%" height="100%">
                    <LineChart data={points} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
                      <CartesianGrid stroke={chartColors.grid} vertical={false} />
                      <XAxis dataKey="time" tickFormatter={(t) => formatDateTime(String(t))} minTickGap={60} interval="preserveStart" tick={tick} />
                      <YAxis width={48} tick={tick} />
                      <Tooltip labelFormatter={(l) => formatDateTime(String(l))} />
                      <Legend wrapperStyle={{ fontSize: 11 }} />
                      <Line type="stepAfter" dataKey="base" name="Compared revision" stroke={chartColors.grey} strokeDasharray="4 3" dot={false} isAnimationActive={false} />
                      <Line type="stepAfter" dataKey="revision" name="This run" stroke={chartColors.accent} dot={false} isAnimationActive={false} />
                    </LineChart>
                  </ResponsiveContainer>
                </div>
              </figure>
              {rows.length > 0 && (
                <Table label={`Changed steps of ${selected.key}`}>
                  <thead>
                    <tr>
                      <Th className="text-right">Step</Th>
                      <Th>Starts</Th>
                      <Th className="text-right">Compared revision</Th>
                      <Th className="text-right">This run</Th>
                      <Th className="text-right">Change</Th>
                    </tr>
                  </thead>
                  <tbody>
                    {rows.map((r) => (
                      <tr key={r.step}>
                        <Td className="text-right font-mono text-xs">{r.step}</Td>
                        <Td className="whitespace-nowrap text-xs">{formatDateTime(r.time)}</Td>
                        <Td className="text-right font-mono text-xs">{formatSolverFigure(r.base)}</Td>
                        <Td className="text-right font-mono text-xs">{formatSolverFigure(r.revision)}</Td>
                        <Td className="text-right font-mono text-xs">{formatSolverChange(r.change)}</Td>
                      </tr>
                    ))}
                  </tbody>
                </Table>
              )}
              {selected.changedSteps > STEP_ROWS && <p className="text-xs text-ash-500">The first {STEP_ROWS} of {selected.changedSteps} changed steps are listed.</p>}
            </div>
          )}
        </div>
      </Panel>
      <AdvisoryNote />
    </div>
  );
}
