import { Button } from '@/components/button';
import { ProblemAlert } from '@/components/problem-alert';
import { StatusPill } from '@/components/status-pill';
import { formatDateTime } from '@/lib/format';
import { isActive, type Run } from '@/lib/queries/runs';
import { usePermission } from '@/lib/session';
import { useCancelRun } from '../api';

export function RunStatusBar({ run }: { run: Run }) {
  const canCancel = usePermission('runs.cancel');
  const cancel = useCancelRun(run.id);
  const progress = run.progress;
  const fraction = progress?.windowsTotal ? progress.windowsDone / progress.windowsTotal : null;
  const errorText = typeof run.error === 'string' ? run.error : run.error?.message;
  return (
    <div className="mb-4 rounded-lg border border-ash-200 bg-white px-3 py-2.5">
      <div className="flex flex-wrap items-center gap-x-5 gap-y-2 text-[13px]">
        <span className="flex items-center gap-2" data-testid="run-status">
          <StatusPill status={run.status} />
          {run.outcome && <span className="text-ash-700">outcome <strong>{run.outcome}</strong></span>}
        </span>
        <span className="text-ash-500">created {formatDateTime(run.createdAt)}</span>
        {run.startedAt && <span className="text-ash-500">started {formatDateTime(run.startedAt)}</span>}
        {run.finishedAt && <span className="text-ash-500">finished {formatDateTime(run.finishedAt)}</span>}
        {isActive(run.status) && canCancel && (
          <Button size="sm" variant="danger" className="ml-auto" onClick={() => cancel.mutate()} disabled={cancel.isPending}>
            {cancel.isPending ? 'Cancelling…' : 'Cancel run'}
          </Button>
        )}
      </div>
      {isActive(run.status) && (
        <div className="mt-2.5">
          <div
            className="h-1.5 overflow-hidden rounded-full bg-ash-100"
            role="progressbar"
            aria-label="Solve progress"
            aria-valuemin={0}
            aria-valuemax={progress?.windowsTotal ?? 1}
            aria-valuenow={progress?.windowsDone ?? 0}
          >
            <div
              className={`h-full rounded-full bg-kiln-500 transition-all ${fraction === null ? 'w-1/3 animate-pulse' : ''}`}
              style={fraction === null ? undefined : { width: `${Math.max(3, fraction * 100)}%` }}
            />
          </div>
          <p className="mt-1 text-xs text-ash-500">
            {run.status === 'queued'
              ? 'Waiting for a solver worker…'
              : progress
                ? `Window ${progress.windowsDone} of ${progress.windowsTotal ?? '?'} done`
                : 'Solving…'}
          </p>
        </div>
      )}
      {errorText && <p className="mt-2 text-sm text-red-800">{errorText}</p>}
      <ProblemAlert error={cancel.error} className="mt-2" />
    </div>
  );
}
