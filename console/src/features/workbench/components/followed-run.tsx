import { Link } from 'react-router-dom';
import { ProblemAlert } from '@/components/problem-alert';
import { StatusPill } from '@/components/status-pill';
import { useRun } from '@/lib/queries/runs';

export function FollowedRun({ runId }: { runId: string }) {
  const run = useRun(runId);
  if (run.error) return <ProblemAlert error={run.error} />;
  const r = run.data;
  const total = r?.progress?.windowsTotal;
  return (
    <div className="flex flex-wrap items-center gap-3 text-[13px]" data-testid="followed-run">
      {r ? <StatusPill status={r.status} /> : <span className="text-ash-500">submitted…</span>}
      {r?.outcome && <span>outcome <strong>{r.outcome}</strong></span>}
      {r && r.status === 'running' && total ? <span className="font-mono text-xs text-ash-500">window {r.progress?.windowsDone}/{total}</span> : null}
      <Link to={`/runs/${runId}`} className="ml-auto font-medium text-kiln-700 underline hover:text-kiln-900">
        Open run
      </Link>
    </div>
  );
}
