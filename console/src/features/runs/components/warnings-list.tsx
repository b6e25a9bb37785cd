import type { ResultWarning } from '@gridwright/shared/run-result';

function stepsText(steps: ResultWarning['steps']) {
  if (!steps?.length) return null;
  return steps.map((r) => (r.from === r.to ? `step ${r.from}` : `steps ${r.from}–${r.to}`)).join(', ');
}

/** Warnings and the infeasibility diagnosis; a pointer opens the submitted spec at the field it names. */
export function WarningsList({ warnings, onPointer }: { warnings: ResultWarning[]; onPointer: (pointer: string) => void }) {
  if (warnings.length === 0) return <p className="text-sm text-ash-500">No warnings.</p>;
  return (
    <ul className="divide-y divide-ash-100" aria-label="Warnings">
      {warnings.map((w, i) => (
        <li key={`${w.code}-${i}`} className="flex flex-wrap items-baseline gap-x-3 gap-y-1 py-1.5 text-[13px]">
          <code className="rounded bg-ash-100 px-1.5 py-0.5 font-mono text-[11px] text-ash-700">{w.code}</code>
          <span className="min-w-0 flex-1 text-ash-800">{w.message}</span>
          {stepsText(w.steps) && <span className="text-xs text-ash-500">{stepsText(w.steps)}</span>}
          {w.pointer && (
            <button type="button" onClick={() => onPointer(w.pointer!)} className="max-w-full break-all text-left font-mono text-xs text-kiln-700 underline hover:text-kiln-900">
              {w.pointer}
            </button>
          )}
        </li>
      ))}
    </ul>
  );
}
