import type { Diagnostic } from '@codemirror/lint';
import { parse, type ParseError } from 'jsonc-parser';
import { validateSiteSpec } from '@gridwright/shared/site-spec';
import { pointerToRange } from '@/lib/json-pointer-range';

export interface PointerIssue {
  pointer: string;
  message: string;
}

/** Places issues that carry JSON Pointers onto the editor text; the message names the pointer when it is not exact. */
export function issuesToDiagnostics(text: string, issues: PointerIssue[], source: string, severity: Diagnostic['severity'] = 'error'): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const issue of issues) {
    const range = pointerToRange(text, issue.pointer);
    if (!range) continue;
    out.push({
      from: range.from,
      to: Math.max(range.to, range.from + 1),
      severity,
      source,
      message: range.exact ? issue.message : `${issue.pointer || '/'}: ${issue.message}`,
    });
  }
  return out;
}

/**
 * What the console can check before asking the API: the text parses, and the shared site-spec
 * rules hold (the same function the API runs, so pointers and wording agree).
 */
export function localSpecIssues(text: string): { syntax: boolean; issues: PointerIssue[] } {
  const errors: ParseError[] = [];
  const value = parse(text, errors, { allowTrailingComma: false, disallowComments: true });
  if (errors.length > 0) return { syntax: true, issues: [] };
  const result = validateSiteSpec(value);
  return { syntax: false, issues: result.ok ? [] : result.errors };
}
