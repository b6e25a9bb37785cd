import { provesInfeasible } from '@gridwright/shared/infeasibility-codes';
import { formatNumber } from '@/lib/format';
import type { SpecCheck } from '../api';

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

/** The verdict of a Check and the model-size estimate; the problems and warnings themselves are listed under the editor. */
export function CheckReport({ check }: { check: SpecCheck }) {
  const size = check.modelSize;
  const blocking = check.warnings.filter((w) => provesInfeasible(w.code)).length;
  const advisory = check.warnings.length - blocking;
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
  const verdict = !check.valid
    ? `✗ ${plural(check.errors.length, 'problem')} — listed under the editor.`
    : blocking > 0
      ? `⚠ The spec is valid, but ${plural(blocking, 'warning')} prove${blocking === 1 ? 's' : ''} the site has no schedule as it stands — marked in the editor.`
      : `✓ The spec is valid.${advisory > 0 ? ` ${plural(advisory, 'warning')} marked in the editor.` : ''}`;
  return (
    <div className="space-y-2 text-[13px]" data-testid="check-report">
      <p role="status" className={`font-medium ${!check.valid ? 'text-red-800' : blocking > 0 ? 'text-amber-900' : 'text-ash-900'}`}>
        {verdict}
      </p>
      {rows.length > 0 && (
        <dl className="grid grid-cols-[1fr_auto] gap-x-4 gap-y-0.5 text-xs" aria-label="Model-size estimate">
          {rows
            .filter(([, v]) => v !== undefined)
            .map(([k, v]) => (
              <div key={k} className="contents">
                <dt className="text-ash-500">{k}</dt>
                <dd className="text-right font-mono">{typeof v === 'number' ? formatNumber(v, 0) : v}</dd>
              </div>
            ))}
        </dl>
      )}
    </div>
  );
}
