import type { SpecCheck } from '../api';

export function CheckReport({ check }: { check: SpecCheck }) {
  const size = check.modelSize;
  const rows: [string, string | number | undefined][] = size
    ? [
        ['mode', size.mode],
        ['windows', size.windows],
        ['parallel segments', size.segments],
        ['variables', size.variables],
        ['binaries before reductions', size.binaries?.before],
        ['binaries after reductions', size.binaries?.after],
        ['constraints', size.constraints],
        ['nonzeros', size.nonzeros],
      ]
    : [];
  return (
    <div className="space-y-2 text-[13px]" data-testid="check-report">
      <p role="status" className={`font-medium ${check.valid ? 'text-ash-900' : 'text-red-800'}`}>
        {check.valid ? '✓ The spec is valid.' : `✗ ${check.errors.length} problem${check.errors.length === 1 ? '' : 's'} — marked in the editor.`}
      </p>
      {check.errors.length > 0 && (
        <ul className="list-disc space-y-0.5 pl-5 text-xs text-red-900">
          {check.errors.map((e) => (
            <li key={`${e.pointer}${e.message}`}>
              <code className="font-mono">{e.pointer || '/'}</code> {e.message}
            </li>
          ))}
        </ul>
      )}
      {check.warnings.length > 0 && (
        <ul className="space-y-0.5 text-xs text-ash-700" aria-label="Warnings">
          {check.warnings.map((w, i) => (
            <li key={i}>
              ⚠ {w.message} {w.pointer && <code className="font-mono text-ash-500">{w.pointer}</code>}
            </li>
          ))}
        </ul>
      )}
      {rows.length > 0 && (
        <dl className="grid grid-cols-[1fr_auto] gap-x-4 gap-y-0.5 text-xs" aria-label="Model-size estimate">
          {rows
            .filter(([, v]) => v !== undefined)
            .map(([k, v]) => (
              <div key={k} className="contents">
                <dt className="text-ash-500">{k}</dt>
                <dd className="text-right font-mono">{v}</dd>
              </div>
            ))}
        </dl>
      )}
    </div>
  );
}
