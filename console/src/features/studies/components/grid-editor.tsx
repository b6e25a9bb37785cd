import { useId } from 'react';
import { STUDY_MAX_CHANGES, STUDY_MAX_RUNS } from '@gridwright/shared/studies';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { parseValues, type ChangeRow } from '../lib/grid-form';

const textarea =
  'w-full rounded-md border border-ash-300 bg-white px-2.5 py-1.5 font-mono text-xs text-ash-900 focus:border-kiln-500 focus:outline-none focus:ring-2 focus:ring-kiln-100 aria-[invalid=true]:border-red-500';

/**
 * The grid of a study: each change a JSON Pointer into the base spec (suggested from it), a label
 * and its values, one JSON value per line. `errors` are the API's, by change index.
 */
export function GridEditor({
  rows,
  onChange,
  suggestions,
  errors,
  combinations,
}: {
  rows: ChangeRow[];
  onChange: (rows: ChangeRow[]) => void;
  suggestions: string[];
  errors: Record<number, string[]>;
  combinations: number;
}) {
  const listId = useId();
  const set = (i: number, patch: Partial<ChangeRow>) => onChange(rows.map((r, j) => (j === i ? { ...r, ...patch } : r)));
  return (
    <div className="space-y-3">
      <datalist id={listId}>
        {suggestions.map((p) => (
          <option key={p} value={p} />
        ))}
      </datalist>
      {rows.map((row, i) => {
        const parsed = parseValues(row.valuesText);
        const valuesId = `${listId}-values-${i}`;
        return (
          <fieldset key={i} className="grid gap-3 rounded-md border border-ash-200 p-3 md:grid-cols-[minmax(0,1.2fr)_minmax(0,0.8fr)_minmax(0,1fr)_auto]" aria-label={`Change ${i + 1}`}>
            <TextField label={`Change ${i + 1}: field (JSON Pointer)`} list={listId} value={row.pointer} placeholder="/storage/0/capacityKwh" onChange={(e) => set(i, { pointer: e.target.value })} />
            <TextField label={`Change ${i + 1}: label`} value={row.label} placeholder="battery kWh" onChange={(e) => set(i, { label: e.target.value })} />
            <div>
              <label htmlFor={valuesId} className="mb-1 block text-xs font-medium text-ash-700">
                Change {i + 1}: values, one per line
              </label>
              <textarea
                id={valuesId}
                rows={Math.min(6, Math.max(2, row.valuesText.split('\n').length))}
                className={textarea}
                aria-invalid={parsed.ok ? undefined : true}
                value={row.valuesText}
                onChange={(e) => set(i, { valuesText: e.target.value })}
              />
              {!parsed.ok && <p className="mt-1 text-xs text-red-700">{parsed.message}</p>}
            </div>
            <div className="flex items-end pb-0.5">
              <Button size="sm" variant="ghost" disabled={rows.length === 1} onClick={() => onChange(rows.filter((_, j) => j !== i))} aria-label={`Remove change ${i + 1}`}>
                Remove
              </Button>
            </div>
            {errors[i]?.length ? (
              <ul className="list-disc pl-5 text-xs text-red-700 md:col-span-4">
                {errors[i].map((m) => (
                  <li key={m}>{m}</li>
                ))}
              </ul>
            ) : null}
          </fieldset>
        );
      })}
      <div className="flex flex-wrap items-center gap-3">
        <Button size="sm" disabled={rows.length >= STUDY_MAX_CHANGES} onClick={() => onChange([...rows, { pointer: '', label: '', valuesText: '' }])}>
          Add a change
        </Button>
        <span className={`text-sm ${combinations > STUDY_MAX_RUNS ? 'text-red-700' : 'text-ash-600'}`} data-testid="combination-count">
          {combinations} combination{combinations === 1 ? '' : 's'} → {combinations} run{combinations === 1 ? '' : 's'}
          {combinations > STUDY_MAX_RUNS ? ` (at most ${STUDY_MAX_RUNS})` : ''}
        </span>
      </div>
    </div>
  );
}
