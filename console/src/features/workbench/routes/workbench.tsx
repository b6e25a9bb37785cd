import { parse, type ParseError } from 'jsonc-parser';
import { useCallback, useMemo, useState } from 'react';
import { exampleSites } from '@gridwright/shared/examples';
import { provesInfeasible } from '@gridwright/shared/infeasibility-codes';
import { Button } from '@/components/button';
import { CodeSnippetPanel } from '@/components/code-snippet-panel';
import { SelectField } from '@/components/field';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { isProblem } from '@/lib/api-problem';
import { usePermission } from '@/lib/session';
import { useCheckSpec, useSubmitRun, type SpecCheck, type SpecDraft } from '../api';
import { CheckReport } from '../components/check-report';
import { FollowedRun } from '../components/followed-run';
import { SpecEditor, type ProblemCounts } from '../components/spec-editor';
import { SpecFromCsv } from '../components/spec-from-csv';
import { UnitCurvesPanel } from '../components/unit-curves-panel';
import { formatSpec } from '../lib/format-spec';
import type { PointerIssue } from '../lib/spec-diagnostics';

const DRAFT_KEY = 'gridwright.workbench.draft';

function parseText(text: string): { value: unknown; ok: boolean } {
  const errors: ParseError[] = [];
  const value = parse(text, errors, { disallowComments: true, allowTrailingComma: false });
  return { value, ok: errors.length === 0 };
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

function footerText(ok: boolean, counts: ProblemCounts): string {
  if (!ok) return 'The text is not valid JSON yet.';
  if (counts.problems === 0 && counts.warnings === 0) return 'No problems found.';
  const parts = [counts.problems > 0 && plural(counts.problems, 'problem'), counts.warnings > 0 && plural(counts.warnings, 'warning')].filter(Boolean);
  return `${parts.join(' and ')} marked in the editor.`;
}

export function WorkbenchRoute() {
  const [text, setText] = useState(() => localStorage.getItem(DRAFT_KEY) ?? formatSpec(exampleSites[0].spec));
  const [templateId, setTemplateId] = useState(exampleSites[0].id);
  // The API's errors for this text, from its Check or a refused Solve; an edit makes them stale.
  const [apiErrors, setApiErrors] = useState<PointerIssue[]>([]);
  const [counts, setCounts] = useState<ProblemCounts>({ problems: 0, warnings: 0 });
  const [confirming, setConfirming] = useState(false);
  const [runId, setRunId] = useState<string | null>(null);
  const check = useCheckSpec();
  const submit = useSubmitRun();
  const canUpload = usePermission('series.create');
  const parsed = useMemo(() => parseText(text), [text]);

  const { reset: resetCheck } = check;
  const { reset: resetSubmit } = submit;
  const edit = useCallback(
    (next: string) => {
      setText(next);
      localStorage.setItem(DRAFT_KEY, next);
      setApiErrors([]);
      setConfirming(false);
      resetCheck();
      resetSubmit();
    },
    [resetCheck, resetSubmit],
  );

  const loadTemplate = () => {
    const t = exampleSites.find((e) => e.id === templateId);
    if (t) edit(formatSpec(t.spec));
  };

  const applyDraft = (draft: SpecDraft) => edit(formatSpec(draft.spec));

  const runCheck = async (): Promise<SpecCheck | null> => {
    const report = await check.mutateAsync(parsed.value).catch(() => null);
    if (report) setApiErrors(report.errors);
    return report;
  };

  const submitNow = () => {
    setConfirming(false);
    submit.mutate(parsed.value, {
      onSuccess: (run) => setRunId(run.id),
      onError: (err) => {
        if (isProblem(err)) setApiErrors(err.errors);
      },
    });
  };

  // Solve checks first (unless this text was just checked) and asks before solving a site the check proves has no schedule.
  const runSolve = async () => {
    setRunId(null);
    const report = check.data ?? (await runCheck());
    if (!report?.valid) return;
    if (report.warnings.some((w) => provesInfeasible(w.code))) setConfirming(true);
    else submitNow();
  };

  // A refusal with field errors is listed under the editor; only what names no field needs its own box.
  const unlistedSubmitError = isProblem(submit.error) && submit.error.errors.length > 0 ? null : submit.error;
  const busy = check.isPending || submit.isPending;

  return (
    <div>
      <PageHeader
        title="Workbench"
        subtitle="Build a site spec from a CSV export or a template, check it against the API, solve it and follow the run. Problems appear at the field they name."
      />
      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_22rem]">
        <div className="min-w-0 space-y-2">
          <SpecEditor value={text} onChange={edit} apiErrors={apiErrors} warnings={check.data?.warnings ?? []} onProblems={setCounts} />
          <p className="text-xs text-ash-500" aria-live="polite" data-testid="editor-problems">
            {footerText(parsed.ok, counts)} Ctrl-Space completes field names from the site-spec schema; hover a field for its description.
          </p>
        </div>
        <div className="space-y-3">
          <Panel title="Check and solve">
            <div className="flex gap-2">
              <Button onClick={runCheck} disabled={!parsed.ok || busy}>
                {check.isPending ? 'Checking…' : 'Check'}
              </Button>
              <Button variant="primary" onClick={runSolve} disabled={!parsed.ok || busy || confirming}>
                {submit.isPending ? 'Submitting…' : 'Solve'}
              </Button>
            </div>
            <div className="mt-3 space-y-2">
              {check.data && <CheckReport check={check.data} />}
              {confirming && (
                <div role="alertdialog" aria-label="Solve a site with no schedule?" className="space-y-2 rounded-md border border-amber-300 bg-amber-50 p-2 text-xs text-amber-950">
                  <p>The check proves this site has no schedule as it stands (marked in the editor). Solve anyway, to get the solver&apos;s diagnosis?</p>
                  <div className="flex gap-2">
                    <Button size="sm" variant="primary" onClick={submitNow}>
                      Solve anyway
                    </Button>
                    <Button size="sm" onClick={() => setConfirming(false)}>
                      Cancel
                    </Button>
                  </div>
                </div>
              )}
              <ProblemAlert error={check.error} />
              <ProblemAlert error={unlistedSubmitError} />
              {runId && <FollowedRun runId={runId} />}
            </div>
          </Panel>
          {canUpload && (
            <Panel title="Spec from a CSV">
              <SpecFromCsv editorSpec={parsed.ok ? parsed.value : null} onDraft={applyDraft} />
            </Panel>
          )}
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
          <Panel title="Unit price curves">
            <UnitCurvesPanel spec={parsed.value} />
          </Panel>
        </div>
      </div>
      <div className="mt-4">
        <Panel title="Call this from code">
          <CodeSnippetPanel spec={parsed.ok ? parsed.value : {}} />
        </Panel>
      </div>
    </div>
  );
}
