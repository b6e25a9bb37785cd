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
import { siteSpecSchema } from '@gridwright/shared/site-spec';
import { issuesToDiagnostics, localSpecIssues, type PointerIssue } from '../lib/spec-diagnostics';

// The editor's schema is generated from the same zod schema the API validates with, so completions never drift.
const specJsonSchema = z.toJSONSchema(siteSpecSchema, { io: 'input', target: 'draft-7', unrepresentable: 'any' }) as JSONSchema7;

// The linter reruns on edits by itself; new API errors arrive without an edit, so they announce themselves with this effect.
const apiErrorsChanged = StateEffect.define<null>();

export interface SpecEditorProps {
  value: string;
  onChange: (text: string) => void;
  /** Errors from the API's last Check or Solve, placed at their JSON Pointers until the text changes. */
  apiErrors: PointerIssue[];
  onDiagnostics?: (count: number) => void;
}

interface Listed {
  from: number;
  to: number;
  line: number;
  message: string;
  source?: string;
}

export function SpecEditor({ value, onChange, apiErrors, onDiagnostics }: SpecEditorProps) {
  const ref = useRef<ReactCodeMirrorRef>(null);
  const apiErrorsRef = useRef(apiErrors);
  const onDiagnosticsRef = useRef(onDiagnostics);
  const [listed, setListed] = useState<Listed[]>([]);
  useEffect(() => {
    onDiagnosticsRef.current = onDiagnostics;
  }, [onDiagnostics]);

  const extensions = useMemo(() => {
    const specLinter = linter(
      (view): Diagnostic[] => {
        const text = view.state.doc.toString();
        const syntax = jsonParseLinter()(view);
        const local = localSpecIssues(text);
        const diagnostics = [
          ...syntax,
          ...(local.syntax ? [] : issuesToDiagnostics(text, local.issues, 'site spec')),
          ...issuesToDiagnostics(text, apiErrorsRef.current, 'API'),
        ];
        onDiagnosticsRef.current?.(diagnostics.length);
        // The editor renders only the lines in view, so the problems are also listed below it, each a jump to its field.
        setListed(diagnostics.map((d) => ({ from: d.from, to: d.to, line: view.state.doc.lineAt(d.from).number, message: d.message, source: d.source })));
        return diagnostics;
      },
      { delay: 250, needsRefresh: (update) => update.transactions.some((tr) => tr.effects.some((e) => e.is(apiErrorsChanged))) },
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
    const view = ref.current?.view;
    view?.dispatch({ effects: apiErrorsChanged.of(null) });
  }, [apiErrors]);

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
        <ul className="mt-2 max-h-40 overflow-y-auto rounded-md border border-red-200 bg-red-50 text-xs" aria-label="Problems in the spec">
          {listed.map((d, i) => (
            <li key={`${d.from}-${i}`}>
              <button type="button" onClick={() => jump(d)} className="flex w-full gap-2 px-2 py-1 text-left text-red-900 hover:bg-red-100">
                <span className="w-14 shrink-0 font-mono text-red-700">line {d.line}</span>
                <span className="flex-1">{d.message}</span>
                {d.source && <span className="text-red-700/70">{d.source}</span>}
              </button>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
