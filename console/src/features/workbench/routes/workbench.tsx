import { applyEdits, modify, parse, type ParseError } from 'jsonc-parser';
import { useCallback, useMemo, useState } from 'react';
import { exampleSites } from '@gridwright/shared/examples';
import { Button } from '@/components/button';
import { SelectField } from '@/components/field';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { isProblem } from '@/lib/api-problem';
import { usePermission } from '@/lib/session';
import { useCheckSpec, useSubmitRun } from '../api';
import { CheckReport } from '../components/check-report';
import { CodePanel } from '../components/code-panel';
import { FollowedRun } from '../components/followed-run';
import { SeriesUpload } from '../components/series-upload';
import { SpecEditor } from '../components/spec-editor';
import { UnitCurvesPanel } from '../components/unit-curves-panel';
import { formatSpec } from '../lib/format-spec';
import type { PointerIssue } from '../lib/spec-diagnostics';

const DRAFT_KEY = 'gridwright.workbench.draft';

function parseText(text: string): { value: unknown; ok: boolean } {
  const errors: ParseError[] = [];
  const value = parse(text, errors, { disallowComments: true, allowTrailingComma: false });
  return { value, ok: errors.length === 0 };
}

export function WorkbenchRoute() {
  const [text, setText] = useState(() => localStorage.getItem(DRAFT_KEY) ?? formatSpec(exampleSites[0].spec));
  const [templateId, setTemplateId] = useState(exampleSites[0].id);
  const [apiErrors, setApiErrors] = useState<PointerIssue[]>([]);
  const [problems, setProblems] = useState(0);
  const [runId, setRunId] = useState<string | null>(null);
  const check = useCheckSpec();
  const submit = useSubmitRun();
  const canUpload = usePermission('series.create');
  const parsed = useMemo(() => parseText(text), [text]);

  const edit = useCallback(
    (next: string) => {
      setText(next);
      localStorage.setItem(DRAFT_KEY, next);
      setApiErrors([]);
    },
    [],
  );

  const loadTemplate = () => {
    const t = exampleSites.find((e) => e.id === templateId);
    if (!t) return;
    edit(formatSpec(t.spec));
    check.reset();
  };

  const pointSupplyAtSeries = (seriesId: string) => {
    const edits = modify(text, ['supply'], { seriesId }, { formattingOptions: { insertSpaces: true, tabSize: 2 } });
    edit(applyEdits(text, edits));
  };

  const runCheck = () =>
    check.mutate(parsed.value, { onSuccess: (report) => setApiErrors(report.errors) });

  const runSolve = () => {
    setRunId(null);
    submit.mutate(parsed.value, {
      onSuccess: (run) => setRunId(run.id),
      onError: (err) => {
        if (isProblem(err)) setApiErrors(err.errors);
      },
    });
  };

  return (
    <div>
      <PageHeader
        title="Workbench"
        subtitle="Write or paste a site spec, check it against the API, solve it and follow the run. Errors appear at the field they name."
      />
      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_22rem]">
        <div className="min-w-0 space-y-2">
          <SpecEditor value={text} onChange={edit} apiErrors={apiErrors} onDiagnostics={setProblems} />
          <p className="text-xs text-ash-500" aria-live="polite" data-testid="editor-problems">
            {!parsed.ok ? 'The text is not valid JSON yet.' : problems > 0 ? `${problems} problem${problems === 1 ? '' : 's'} marked in the editor.` : 'No problems found.'}
            {' '}Ctrl-Space completes field names from the site-spec schema; hover a field for its description.
          </p>
        </div>
        <div className="space-y-3">
          <Panel title="Template">
            <div className="space-y-2">
              <SelectField label="Demo site" value={templateId} onChange={(e) => setTemplateId(e.target.value)}>
                {exampleSites.map((t) => (
                  <option key={t.id} value={t.id}>
                    {t.title}
                  </option>
                ))}
              </SelectField>
              <p className="text-xs text-ash-500">{exampleSites.find((t) => t.id === templateId)?.description}</p>
              <Button size="sm" onClick={loadTemplate}>
                Load template
              </Button>
            </div>
          </Panel>
          <Panel title="Check and solve">
            <div className="flex gap-2">
              <Button onClick={runCheck} disabled={!parsed.ok || check.isPending}>
                {check.isPending ? 'Checking…' : 'Check'}
              </Button>
              <Button variant="primary" onClick={runSolve} disabled={!parsed.ok || submit.isPending}>
                {submit.isPending ? 'Submitting…' : 'Solve'}
              </Button>
            </div>
            <div className="mt-3 space-y-2">
              {check.data && <CheckReport check={check.data} />}
              <ProblemAlert error={check.error} />
              <ProblemAlert error={submit.error} />
              {runId && <FollowedRun runId={runId} />}
            </div>
          </Panel>
          <Panel title="Unit price curves">
            <UnitCurvesPanel spec={parsed.value} />
          </Panel>
          {canUpload && (
            <Panel title="Supply from a CSV">
              <SeriesUpload onUse={pointSupplyAtSeries} />
            </Panel>
          )}
        </div>
      </div>
      <div className="mt-4">
        <Panel title="Call this from code">
          <CodePanel spec={parsed.ok ? parsed.value : {}} />
        </Panel>
      </div>
    </div>
  );
}
