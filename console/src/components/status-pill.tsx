import type { RunStatus } from '@gridwright/shared/run-result';

/** One style per state of RUN_STATUSES: a state added to the list does not type-check until it has one. */
const styles: Record<RunStatus, string> = {
  queued: 'bg-ash-100 text-ash-700 ring-ash-300',
  running: 'bg-kiln-50 text-kiln-700 ring-kiln-200',
  succeeded: 'bg-ash-900 text-white ring-ash-900',
  failed: 'bg-red-50 text-red-800 ring-red-200',
  cancelled: 'bg-white text-ash-500 ring-ash-300 line-through',
};

export function StatusPill({ status }: { status: RunStatus }) {
  return (
    <span className={`inline-flex items-center gap-1 rounded px-1.5 py-0.5 text-[11px] font-medium ring-1 ring-inset ${styles[status] ?? styles.queued}`}>
      {status === 'running' && <span className="h-1.5 w-1.5 animate-pulse rounded-full bg-kiln-500" aria-hidden="true" />}
      {status}
    </span>
  );
}
