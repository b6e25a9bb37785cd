import { autocompletion } from '@codemirror/autocomplete';
import { json, jsonLanguage, jsonParseLinter } from '@codemirror/lang-json';
import { linter, lintGutter, type Diagnostic } from '@codemirror/lint';
import { EditorSelection, StateEffect } from '@codemirror/state';
import { EditorView, hoverTooltip } from '@codemirror/view';
import CodeMirror, { type ReactCodeMirrorRef } from '@uiw/react-codemirror';
import { jsonCompletion, jsonSchemaHover, stateExtensions } from 'codemirror-json-schema';
import type { JSONSchema7 } from 'json-schema';
import { useEffect, useMemo, useRef, useState } from 'react';
import { z } from 'zod';
import { provesInfeasible } from '@gridwright/shared/infeasibility-codes';
import { siteSpecSchema } from '@gridwright/shared/site-spec';
import type { SpecWarning } from '../api';
import { issuesToDiagnostics, localSpecIssues, mergeIssues, type PointerIssue } from '../lib/spec-diagnostics';

// The editor's schema is generated from the same zod schema the API validates with, so completions never drift.
const specJsonSchema = z.toJSONSchema(siteSpecSchema, { io: 'input', target: 'draft-7', unrepresentable: 'any' }) as JSONSchema7;

// The linter reruns on edits by itself; the API's answers arrive without an edit, so they announce themselves with this effect.
const apiAnswerChanged = StateEffect.define<null>();

export interface ProblemCounts {
  problems: number;
  warnings: number;
}

export interface SpecEditorProps {
  value: string;
  onChange: (text: string) => void;
  /** Errors from the API's last Check or Solve, placed at their JSON Pointers until the text changes. */
  apiErrors: PointerIssue[];
  /** Warnings of the API's last Check of this text: those that prove the site infeasible are marked as such. */
  warnings: SpecWarning[];
  onProblems?: (counts: ProblemCounts) => void;
}

interface Listed {
  from: number;
  to: number;
  line: number;
  message: string;
  source?: string;
  severity: Diagnostic['severity'];
}

const INFEASIBLE = 'no schedule as it stands';

export function SpecEditor({ value, onChange, apiErrors, warnings, onProblems }: SpecEditorProps) {
  const ref = useRef<ReactCodeMirrorRef>(null);
  const apiErrorsRef = useRef(apiErrors);
  const warningsRef = useRef(warnings);
  const onProblemsRef = useRef(onProblems);
  const [listed, setListed] = useState<Listed[]>([]);
  useEffect(() => {
    onProblemsRef.current = onProblems;
  }, [onProblems]);

  const extensions = useMemo(() => {
    const specLinter = linter(
      (view): Diagnostic[] => {
        const text = view.state.doc.toString();
        const syntax = jsonParseLinter()(view);
        const local = localSpecIssues(text);
        // The console's check and the API's apply the same rules, so most problems come from both: listed once.
        const problems = mergeIssues([
          { source: 'site spec', issues: local.issues },
          { source: 'API', issues: apiErrorsRef.current },
        ]);
        const checkWarnings = warningsRef.current.map((w) => ({
          pointer: w.pointer ?? '',
          message: provesInfeasible(w.code) ? `${w.message} (${INFEASIBLE})` : w.message,
          source: `check · ${w.code}`,
        }));
        const errors = [...syntax, ...issuesToDiagnostics(text, problems, 'site spec')];
        const warned = issuesToDiagnostics(text, checkWarnings, 'check', 'warning');
        onProblemsRef.current?.({ problems: errors.length, warnings: warned.length });
        const diagnostics = [...errors, ...warned];
        // The editor renders only the lines in view, so the problems are also listed below it, each a jump to its field.
        setListed(
          diagnostics.map((d) => ({ from: d.from, to: d.to, line: view.state.doc.lineAt(d.from).number, message: d.message, source: d.source, severity: d.severity })),
        );
        return diagnostics;
      },
      { delay: 250, needsRefresh: (update) => update.transactions.some((tr) => tr.effects.some((e) => e.is(apiAnswerChanged))) },
    );
    return [
      json(),
      specLinter,
      lintGutter(),
      autocompletion(),
      jsonLanguage.data.of({ autocomplete: jsonCompletion() }),
      hoverTooltip(jsonSchemaHover()),
      stateExtensions(specJsonSchema),
      EditorView.contentAttributes.of({ 'aria-label': 'Site spec JSON' }),
    ];
  }, []);

  useEffect(() => {
    apiErrorsRef.current = apiErrors;
    warningsRef.current = warnings;
    const view = ref.current?.view;
    view?.dispatch({ effects: apiAnswerChanged.of(null) });
  }, [apiErrors, warnings]);

  const jump = (d: Listed) => {
    const view = ref.current?.view;
    if (!view) return;
    const to = Math.min(d.to, view.state.doc.length);
    view.dispatch({ selection: EditorSelection.single(d.from, to), effects: EditorView.scrollIntoView(d.from, { y: 'center' }) });
    view.focus();
  };

  return (
    <div>
      <div className="overflow-hidden rounded-lg border border-ash-300 bg-white" data-testid="spec-editor">
        <CodeMirror ref={ref} value={value} onChange={onChange} height="32rem" extensions={extensions} basicSetup={{ foldGutter: true, autocompletion: false }} />
      </div>
      {listed.length > 0 && (
        <ul className="mt-2 max-h-48 divide-y divide-ash-100 overflow-y-auto rounded-md border border-ash-200 bg-white text-xs" aria-label="Problems in the spec">
          {listed.map((d, i) => {
            const warning = d.severity === 'warning';
            return (
              <li key={`${d.from}-${i}`}>
                <button
                  type="button"
                  onClick={() => jump(d)}
                  className={`flex w-full gap-2 px-2 py-1 text-left ${warning ? 'bg-amber-50 text-amber-950 hover:bg-amber-100' : 'bg-red-50 text-red-900 hover:bg-red-100'}`}
                >
                  <span className={`w-14 shrink-0 font-mono ${warning ? 'text-amber-800' : 'text-red-700'}`}>line {d.line}</span>
                  <span className="min-w-0 flex-1 break-words">
                    {warning ? '⚠ ' : ''}
                    {d.message}
                  </span>
                  {d.source && <span className={`shrink-0 ${warning ? 'text-amber-800/80' : 'text-red-700/70'}`}>{d.source}</span>}
                </button>
              </li>
            );
          })}
        </ul>
      )}
    </div>
  );
}
