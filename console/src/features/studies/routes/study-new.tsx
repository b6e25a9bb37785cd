import { useMemo, useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { exampleSites } from '@gridwright/shared/examples';
import { parsePointer } from '@gridwright/shared/json-pointer';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { isProblem } from '@/lib/api-problem';
import { getRunSpecForStudy, useCreateStudy } from '../api';
import { GridEditor } from '../components/grid-editor';
import { combinationCount, parseValues, suggestPointers, type ChangeRow } from '../lib/grid-form';

const pretty = (value: unknown) => JSON.stringify(value, null, 2);

function readSpec(text: string): { ok: true; spec: Record<string, unknown> } | { ok: false; message: string } {
  try {
    const spec = JSON.parse(text);
    return spec && typeof spec === 'object' && !Array.isArray(spec) ? { ok: true, spec } : { ok: false, message: 'the base spec must be a JSON object' };
  } catch (err) {
    return { ok: false, message: `the base spec is not valid JSON: ${(err as Error).message}` };
  }
}

/** A first change for a spec: its first battery's capacity at its size and twice that, when it has one. */
function firstRow(spec: Record<string, unknown>): ChangeRow {
  const capacity = (spec.storage as { capacityKwh?: number }[] | undefined)?.[0]?.capacityKwh;
  return typeof capacity === 'number'
    ? { pointer: '/storage/0/capacityKwh', label: 'battery kWh', valuesText: `${capacity}\n${capacity * 2}` }
    : { pointer: '', label: '', valuesText: '' };
}

/** The API's errors about the grid, by the index of the change they name (`/changes/1/values/0` → 1). */
function errorsByChange(error: unknown): Record<number, string[]> {
  if (!isProblem(error)) return {};
  const out: Record<number, string[]> = {};
  for (const e of error.errors) {
    if (!e.pointer.startsWith('/changes/')) continue;
    const [, index] = parsePointer(e.pointer);
    (out[Number(index)] ??= []).push(e.message);
  }
  return out;
}

export function StudyNewRoute() {
  const initial = exampleSites[0].spec as unknown as Record<string, unknown>;
  const [templateId, setTemplateId] = useState(exampleSites[0].id);
  const [runId, setRunId] = useState('');
  const [loadError, setLoadError] = useState<unknown>(null);
  const [specText, setSpecText] = useState(() => pretty(initial));
  const [name, setName] = useState('');
  const [rows, setRows] = useState<ChangeRow[]>(() => [firstRow(initial)]);
  const create = useCreateStudy();
  const navigate = useNavigate();
  const spec = useMemo(() => readSpec(specText), [specText]);
  const suggestions = useMemo(() => (spec.ok ? suggestPointers(spec.spec) : []), [spec]);
  const combinations = combinationCount(rows);

  const adoptBase = (base: Record<string, unknown>) => {
    setSpecText(pretty(base));
    setRows([firstRow(base)]);
    create.reset();
  };
  const loadRun = async () => {
    setLoadError(null);
    try {
      adoptBase((await getRunSpecForStudy(runId.trim())) as unknown as Record<string, unknown>);
    } catch (err) {
      setLoadError(err);
    }
  };
  const start = () => {
    if (!spec.ok) return;
    const changes = rows.map((r) => {
      const parsed = parseValues(r.valuesText);
      return { pointer: r.pointer.trim(), ...(r.label.trim() ? { label: r.label.trim() } : {}), values: parsed.ok ? parsed.values : [] };
    });
    create.mutate({ ...(name.trim() ? { name: name.trim() } : {}), baseSpec: spec.spec as never, changes }, { onSuccess: (study) => navigate(`/studies/${study.id}`) });
  };

  return (
    <div>
      <PageHeader title="New study" subtitle="A base spec and up to four changes; every combination of their values becomes a run, solved by the worker pool like any other." />
      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_minmax(0,1.2fr)]">
        <Panel title="Base spec">
          <div className="mb-3 flex flex-wrap items-end gap-2">
            <SelectField label="Demo site" className="w-72" value={templateId} onChange={(e) => setTemplateId(e.target.value)}>
              {exampleSites.map((e) => (
                <option key={e.id} value={e.id}>
                  {e.title}
                </option>
              ))}
            </SelectField>
            <Button size="sm" onClick={() => adoptBase(exampleSites.find((e) => e.id === templateId)!.spec as unknown as Record<string, unknown>)}>
              Use this site
            </Button>
            <TextField label="…or a run's spec (run id)" className="w-80" value={runId} onChange={(e) => setRunId(e.target.value)} placeholder="3d9b6c1e-…" />
            <Button size="sm" disabled={!runId.trim()} onClick={loadRun}>
              Load
            </Button>
          </div>
          <ProblemAlert error={loadError} className="mb-2" />
          <label htmlFor="study-base-spec" className="mb-1 block text-xs font-medium text-ash-700">
            Base spec (JSON, editable)
          </label>
          <textarea
            id="study-base-spec"
            className="h-[28rem] w-full rounded-md border border-ash-300 bg-white px-2.5 py-1.5 font-mono text-xs text-ash-900 focus:border-kiln-500 focus:outline-none"
            spellCheck={false}
            aria-invalid={spec.ok ? undefined : true}
            value={specText}
            onChange={(e) => setSpecText(e.target.value)}
          />
          {!spec.ok && <p className="mt-1 text-xs text-red-700">{spec.message}</p>}
        </Panel>
        <Panel title="Grid of changes">
          <div className="space-y-4">
            <TextField label="Study name" value={name} onChange={(e) => setName(e.target.value)} placeholder="Default: the base spec's name" />
            <GridEditor rows={rows} onChange={setRows} suggestions={suggestions} errors={errorsByChange(create.error)} combinations={combinations} />
            <p className="text-xs text-ash-500">
              Each run counts against the monthly runs quota and the runs your plan allows queued or running at once. Every combination is checked before anything is
              created.
            </p>
            <ProblemAlert error={create.error} />
            <Button variant="primary" disabled={!spec.ok || combinations === 0 || create.isPending} onClick={start}>
              {create.isPending ? 'Checking and queuing…' : `Start study (${combinations} runs)`}
            </Button>
          </div>
        </Panel>
      </div>
    </div>
  );
}
