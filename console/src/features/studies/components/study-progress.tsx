import type { StudyStatus, StudyView } from '@gridwright/shared/studies';

const statusStyles: Record<StudyStatus, string> = {
  running: 'bg-kiln-50 text-kiln-700 ring-kiln-200',
  finished: 'bg-ash-900 text-white ring-ash-900',
  cancelled: 'bg-white text-ash-500 ring-ash-300 line-through',
};

export function StudyStatusPill({ status }: { status: StudyStatus }) {
  return (
    <span className={`inline-flex items-center gap-1 rounded px-1.5 py-0.5 text-[11px] font-medium ring-1 ring-inset ${statusStyles[status]}`}>
      {status === 'running' && <span className="h-1.5 w-1.5 animate-pulse rounded-full bg-kiln-500" aria-hidden="true" />}
      {status}
    </span>
  );
}

/** A bar of the study's progress and its runs by state: what a long study (a year × 8 variants) shows while it works. */
export function StudyProgress({ study, compact = false }: { study: StudyView; compact?: boolean }) {
  const p = study.progress;
  const label = `${p.runsDone} of ${p.runsTotal} runs done`;
  return (
    <div className={compact ? 'min-w-[10rem]' : ''}>
      <div
        className={`${compact ? 'h-1.5' : 'h-2'} overflow-hidden rounded-full bg-ash-100`}
        role="progressbar"
        aria-label={`Study progress: ${label}`}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={p.percent}
      >
        <div className="h-full rounded-full bg-kiln-500 transition-all" style={{ width: `${Math.max(study.status === 'running' ? 2 : 0, p.percent)}%` }} />
      </div>
      <p className={`mt-1 text-ash-600 ${compact ? 'text-[11px]' : 'text-xs'}`} data-testid={compact ? undefined : 'study-progress'}>
        {label} · {p.percent} %{compact ? '' : ` · ${p.running} running, ${p.queued} queued, ${p.succeeded} succeeded, ${p.failed} failed, ${p.cancelled} cancelled`}
      </p>
    </div>
  );
}
