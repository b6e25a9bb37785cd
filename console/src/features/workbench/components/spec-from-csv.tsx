import { useMemo, useState } from 'react';
import { ROLE_KIND } from '@gridwright/shared/series-roles';
import { Button } from '@/components/button';
import { CheckboxField, SelectField, TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { formatDateTime } from '@/lib/format';
import { useDraftSpec, useSeriesList, useUploadSeries, type SeriesRole, type SpecDraft, type UploadedSeries } from '../api';
import { groupUploads, keptHorizonWindow, type SeriesUpload } from '../lib/series-uploads';

const ROLE_LABELS: Record<SeriesRole, string> = {
  supply: 'Supply (availability)',
  siteLoad: 'Site load',
  importPrice: 'Import price',
  exportPrice: 'Export price',
  storeDemand: "A store's demand",
  reserve: 'Reserve requirement',
};
const ROLES = Object.keys(ROLE_LABELS) as SeriesRole[];

const timeZones: string[] = typeof Intl.supportedValuesOf === 'function' ? Intl.supportedValuesOf('timeZone') : [];

interface Assignment {
  role: SeriesRole | '';
  storeId: string;
}

const suggested = (columns: UploadedSeries[]): Record<string, Assignment> =>
  Object.fromEntries(columns.map((c) => [c.id ?? '', { role: c.suggestedRole ?? '', storeId: '' }]));

function storeIdsOf(spec: unknown): string[] {
  const stores = (spec as { stores?: unknown } | null)?.stores;
  return Array.isArray(stores) ? stores.map((s) => (s as { id?: unknown })?.id).filter((id): id is string => typeof id === 'string') : [];
}

function UploadSummary({ upload }: { upload: SeriesUpload }) {
  return (
    <p className="text-xs text-ash-600" data-testid="csv-horizon">
      {upload.steps > 0 ? (
        <>
          The file covers <strong>{upload.steps} steps</strong> of {upload.stepMinutes} min from {formatDateTime(upload.start, upload.timeZone)}
          {upload.timeZone ? <> ({upload.timeZone})</> : <> (offset {upload.start.slice(19) || 'UTC'})</>}
        </>
      ) : (
        'Its columns share no step, so they cannot set one horizon together.'
      )}
    </p>
  );
}

/**
 * From a SCADA or historian CSV to spec fields: upload the file (or pick an earlier upload), give
 * each column a role (the header's suggestion comes preselected) and build them into the spec being
 * edited, horizon included. The API does the building (`POST /v1/series/spec-draft`).
 */
export function SpecFromCsv({ editorSpec, onDraft }: { editorSpec: unknown; onDraft: (draft: SpecDraft) => void }) {
  const series = useSeriesList();
  const upload = useUploadSeries();
  const draft = useDraftSpec();
  const [timeZone, setTimeZone] = useState('');
  const [pickedKey, setPickedKey] = useState<string | null>(null);
  const [assignments, setAssignments] = useState<Record<string, Assignment>>({});
  const [horizonFromFile, setHorizonFromFile] = useState(true);
  const uploads = useMemo(() => groupUploads(series.data ?? []), [series.data]);
  // Until the list has refetched, a file just uploaded is known from the upload's own answer.
  const picked = uploads.find((u) => u.key === pickedKey) ?? groupUploads(upload.data ?? []).find((u) => u.key === pickedKey) ?? null;
  const storeIds = storeIdsOf(editorSpec);
  const keptWindow = picked ? keptHorizonWindow(editorSpec, picked) : null;

  const pick = (next: SeriesUpload) => {
    setPickedKey(next.key);
    setAssignments(suggested(next.columns));
    draft.reset();
  };

  const onFile = (file: File | undefined) => {
    if (!file) return;
    upload.mutate(
      { file, name: file.name.replace(/\.csv$/i, ''), timezone: timeZone },
      {
        onSuccess: (items) => {
          setPickedKey(items[0]?.uploadId ?? items[0]?.id ?? null);
          setAssignments(suggested(items));
          draft.reset();
        },
      },
    );
  };

  const assigned = picked ? picked.columns.filter((c) => assignments[c.id ?? '']?.role) : [];
  const build = () => {
    if (!picked) return;
    const base = editorSpec && typeof editorSpec === 'object' && !Array.isArray(editorSpec) ? (editorSpec as Record<string, unknown>) : undefined;
    draft.mutate(
      {
        assignments: assigned.map((c) => {
          const a = assignments[c.id ?? ''];
          return { seriesId: c.id ?? '', role: a.role as SeriesRole, ...(a.role === 'storeDemand' ? { storeId: a.storeId } : {}) };
        }),
        base,
        ...(!horizonFromFile && keptWindow ? { horizon: keptWindow } : {}),
      },
      { onSuccess: onDraft },
    );
  };

  return (
    <div className="space-y-3">
      <TextField
        label="Time zone of local timestamps"
        list="iana-time-zones"
        value={timeZone}
        onChange={(e) => setTimeZone(e.target.value)}
        placeholder="from the file"
        hint="Only for timestamps without a UTC offset whose header names no zone, e.g. time (Europe/Vienna)."
      />
      <datalist id="iana-time-zones">
        {timeZones.map((z) => (
          <option key={z} value={z} />
        ))}
      </datalist>
      <div>
        <label htmlFor="series-file" className="mb-1 block text-xs font-medium text-ash-700">
          SCADA CSV export (a timestamp column, then power, price or rate columns)
        </label>
        <input
          id="series-file"
          type="file"
          accept=".csv,text/csv"
          disabled={upload.isPending}
          onChange={(e) => onFile(e.target.files?.[0])}
          className="block w-full text-xs file:mr-2 file:rounded file:border file:border-ash-300 file:bg-white file:px-2 file:py-1"
        />
        {upload.isPending && <p className="mt-1 text-xs text-ash-500" role="status">Reading the file…</p>}
      </div>
      <ProblemAlert error={upload.error} />

      {picked && (
        <div className="space-y-2 rounded-md border border-ash-200 bg-ash-25 p-2" data-testid="csv-roles">
          <p className="text-xs font-medium text-ash-800">{picked.name}</p>
          <UploadSummary upload={picked} />
          <CheckboxField
            label="Set the spec's horizon from the file"
            checked={horizonFromFile || !keptWindow}
            disabled={!keptWindow}
            onChange={(e) => setHorizonFromFile(e.target.checked)}
          />
          {!keptWindow && <p className="text-[11px] text-ash-500">The spec in the editor has no horizon of {picked.stepMinutes}-minute steps to keep.</p>}
          {!horizonFromFile && keptWindow && (
            <p className="text-[11px] text-ash-500">
              Keeps the editor's {keptWindow.steps} steps from {keptWindow.start}; the file must cover them.
            </p>
          )}
          <ul className="space-y-1.5" aria-label="Column roles">
            {picked.columns.map((c) => {
              const id = c.id ?? '';
              const a = assignments[id] ?? { role: '', storeId: '' };
              return (
                <li key={id} className="space-y-1">
                  <SelectField
                    label={`${c.column} · ${c.unit}`}
                    value={a.role}
                    onChange={(e) => setAssignments((all) => ({ ...all, [id]: { ...a, role: e.target.value as SeriesRole | '' } }))}
                  >
                    <option value="">— not used —</option>
                    {ROLES.filter((r) => ROLE_KIND[r] === c.kind).map((r) => (
                      <option key={r} value={r}>
                        {ROLE_LABELS[r]}
                      </option>
                    ))}
                  </SelectField>
                  {a.role === 'storeDemand' && (
                    <SelectField label="Store" value={a.storeId} onChange={(e) => setAssignments((all) => ({ ...all, [id]: { ...a, storeId: e.target.value } }))}>
                      <option value="">— choose a store of the spec —</option>
                      {storeIds.map((s) => (
                        <option key={s} value={s}>
                          {s}
                        </option>
                      ))}
                    </SelectField>
                  )}
                </li>
              );
            })}
          </ul>
          <Button variant="primary" size="sm" onClick={build} disabled={assigned.length === 0 || draft.isPending}>
            {draft.isPending ? 'Building…' : 'Build spec from the file'}
          </Button>
          <p className="text-[11px] text-ash-500">Into the spec in the editor: its units, storage and settings stay; the chosen fields come from the file.</p>
          <ProblemAlert error={draft.error} />
          {draft.data && draft.data.notes.length > 0 && (
            <ul className="list-disc space-y-0.5 pl-4 text-xs text-amber-900" aria-label="Notes on the built spec">
              {draft.data.notes.map((n) => (
                <li key={`${n.pointer}${n.message}`}>
                  <code className="font-mono">{n.pointer}</code> {n.message}
                </li>
              ))}
            </ul>
          )}
        </div>
      )}

      {uploads.length > 0 && (
        <details className="text-xs" open={!picked}>
          <summary className="cursor-pointer font-medium text-ash-700">Earlier uploads ({uploads.length})</summary>
          <ul className="mt-1 divide-y divide-ash-100" aria-label="Uploaded series">
            {uploads.map((u) => (
              <li key={u.key} className="flex items-center gap-2 py-1">
                <span className="min-w-0 flex-1">
                  <span className="block truncate font-medium text-ash-800" title={u.name}>
                    {u.name}
                  </span>
                  <span className="block text-ash-500">
                    {u.columns.length} column{u.columns.length === 1 ? '' : 's'} · {u.steps} × {u.stepMinutes} min · {formatDateTime(u.start, u.timeZone)} – {formatDateTime(u.end, u.timeZone)}
                  </span>
                </span>
                {u.key === picked?.key ? (
                  <span className="text-kiln-700">open</span>
                ) : (
                  <Button size="sm" variant="ghost" onClick={() => pick(u)}>
                    Use
                  </Button>
                )}
              </li>
            ))}
          </ul>
        </details>
      )}
    </div>
  );
}
