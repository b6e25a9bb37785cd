import { useState } from 'react';
import { Link, useParams, useSearchParams } from 'react-router-dom';
import { AdvisoryNote } from '@/components/advisory-note';
import { JsonViewer } from '@/components/json-viewer';
import { PageHeader } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { useRun } from '@/lib/queries/runs';
import { runResult, useRunSpec } from '../api';
import { DispatchView } from '../components/dispatch-view';
import { DownloadsPanel } from '../components/downloads-panel';
import { FormulationReport } from '../components/formulation-report';
import { RunDeliveries } from '../components/run-deliveries';
import { RunStatusBar } from '../components/run-status-bar';
import { ScheduleTable } from '../components/schedule-table';

const views = [
  { id: 'dispatch', label: 'Dispatch' },
  { id: 'schedule', label: 'Step table' },
  { id: 'formulation', label: 'Formulation report' },
  { id: 'spec', label: 'Submitted spec' },
  { id: 'deliveries', label: 'Webhook deliveries' },
] as const;
type View = (typeof views)[number]['id'];

export function RunDetailRoute() {
  const { runId = '' } = useParams();
  const [params, setParams] = useSearchParams();
  const view = (views.find((v) => v.id === params.get('view'))?.id ?? 'dispatch') as View;
  const [pointer, setPointer] = useState<string | null>(null);
  const run = useRun(runId);
  const spec = useRunSpec(runId);

  const show = (v: View) => setParams((p) => {
    p.set('view', v);
    return p;
  }, { replace: true });
  const openPointer = (p: string) => {
    setPointer(p);
    show('spec');
  };

  if (run.isPending) return <Loading label="Loading run…" />;
  if (run.error) return <ProblemAlert error={run.error} />;
  const r = run.data;
  const result = runResult(r);
  return (
    <div>
      <PageHeader
        title={r.name || 'Untitled run'}
        subtitle={
          <span className="flex items-center gap-2">
            <Link to="/runs" className="hover:underline">Runs</Link> / <code className="font-mono text-xs">{r.id}</code>
          </span>
        }
        actions={result?.schedule && <DownloadsPanel runId={r.id} />}
      />
      <RunStatusBar run={r} />
      <div role="tablist" aria-label="Run views" className="mb-3 flex gap-1 overflow-x-auto border-b border-ash-200">
        {views.map((v) => (
          <button
            key={v.id}
            role="tab"
            type="button"
            aria-selected={view === v.id}
            onClick={() => show(v.id)}
            className={`-mb-px whitespace-nowrap border-b-2 px-3 py-1.5 text-[13px] ${view === v.id ? 'border-kiln-600 font-medium text-ash-900' : 'border-transparent text-ash-500 hover:text-ash-800'}`}
          >
            {v.label}
          </button>
        ))}
      </div>
      <div role="tabpanel" aria-label={views.find((v) => v.id === view)?.label}>
        {view === 'spec' ? (
          spec.isPending ? <Loading /> : spec.error ? <ProblemAlert error={spec.error} /> : <JsonViewer value={spec.data} pointer={pointer} />
        ) : view === 'deliveries' ? (
          <RunDeliveries runId={r.id} />
        ) : !result ? (
          <EmptyState title={r.status === 'failed' || r.status === 'cancelled' ? `This run ${r.status} before it produced a result` : 'The result appears here when the run finishes'} />
        ) : view === 'dispatch' ? (
          <DispatchView result={result} elapsedSeconds={r.solverSeconds} spec={spec.data} onPointer={openPointer} />
        ) : view === 'schedule' ? (
          result.schedule ? (
            <div className="space-y-2">
              <AdvisoryNote />
              <ScheduleTable schedule={result.schedule} spec={spec.data} />
            </div>
          ) : (
            <EmptyState title="No schedule for this outcome" />
          )
        ) : (
          <FormulationReport model={result.model} spec={spec.data} />
        )}
      </div>
    </div>
  );
}
