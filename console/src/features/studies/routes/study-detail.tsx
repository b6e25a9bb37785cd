import { Link, useParams } from 'react-router-dom';
import { Button } from '@/components/button';
import { Table, Td, Th } from '@/components/data-table';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { OpenRunLink } from '@/components/open-run-link';
import { StatusPill } from '@/components/status-pill';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { usePermission } from '@/lib/session';
import { useCancelStudy, useStudy, useStudyComparison } from '../api';
import { ComparisonView } from '../components/comparison-view';
import { StudyProgress, StudyStatusPill } from '../components/study-progress';
import { valueLabel } from '../lib/grid-form';

export function StudyDetailRoute() {
  const { studyId = '' } = useParams();
  const study = useStudy(studyId);
  const running = study.data?.status === 'running';
  const comparison = useStudyComparison(studyId);
  const cancel = useCancelStudy(studyId);
  const canCancel = usePermission('runs.cancel');
  if (study.isPending) return <Loading label="Loading the study…" />;
  if (study.error) return <ProblemAlert error={study.error} />;
  const s = study.data;
  const runs = s.runs ?? [];
  return (
    <div>
      <PageHeader
        title={s.name ?? 'Untitled study'}
        subtitle={
          <span className="flex items-center gap-2">
            <Link to="/studies" className="hover:underline">Studies</Link> / <code className="font-mono text-xs">{s.id}</code>
          </span>
        }
        actions={
          running &&
          canCancel && (
            <Button variant="danger" size="sm" onClick={() => cancel.mutate()} disabled={cancel.isPending}>
              {cancel.isPending ? 'Cancelling…' : 'Cancel study'}
            </Button>
          )
        }
      />
      <div className="mb-4 rounded-lg border border-ash-200 bg-white px-3 py-2.5">
        <div className="mb-2 flex flex-wrap items-center gap-x-5 gap-y-1 text-[13px]">
          <span data-testid="study-status">
            <StudyStatusPill status={s.status} />
          </span>
          <span className="text-ash-500">created {formatDateTime(s.createdAt)}</span>
          <span className="text-ash-600">{s.changes.map((c) => `${c.label} × ${c.values.length}`).join(' · ')}</span>
        </div>
        <StudyProgress study={s} />
        <ProblemAlert error={cancel.error} className="mt-2" />
      </div>
      <div className="space-y-4">
        <Panel title="Runs">
          <Table label="Study runs">
            <thead>
              <tr>
                <Th className="text-right">#</Th>
                {s.changes.map((c) => (
                  <Th key={c.pointer}>{c.label}</Th>
                ))}
                <Th>Status</Th>
                <Th>Windows</Th>
                <Th>Run</Th>
              </tr>
            </thead>
            <tbody>
              {runs.map((r) => (
                <tr key={r.runId}>
                  <Td className="text-right font-mono text-xs">{r.position}</Td>
                  {r.values.map((v, i) => (
                    <Td key={i} className="font-mono text-xs">
                      {valueLabel(v)}
                    </Td>
                  ))}
                  <Td>
                    <StatusPill status={r.status} />
                  </Td>
                  <Td className="min-w-[9rem]">
                    <div className="h-1.5 overflow-hidden rounded-full bg-ash-100" role="progressbar" aria-label={`Run ${r.position} progress`} aria-valuemin={0} aria-valuemax={100} aria-valuenow={r.progress.percent}>
                      <div className="h-full rounded-full bg-kiln-500" style={{ width: `${r.progress.percent}%` }} />
                    </div>
                    <span className="font-mono text-[11px] text-ash-500">
                      {r.progress.windowsDone}/{r.progress.windowsTotal ?? '?'} windows
                    </span>
                  </Td>
                  <Td>
                    <OpenRunLink runId={r.runId} />
                  </Td>
                </tr>
              ))}
            </tbody>
          </Table>
        </Panel>
        <Panel title="Comparison">
          {comparison.isPending ? (
            <Loading label="Comparing the runs…" />
          ) : comparison.error ? (
            <ProblemAlert error={comparison.error} />
          ) : comparison.data.rows.some((r) => r.objective !== null) ? (
            <ComparisonView comparison={comparison.data} />
          ) : (
            <EmptyState title="The comparison fills in as runs finish">Each row shows its figures once its run has a schedule.</EmptyState>
          )}
        </Panel>
      </div>
    </div>
  );
}
