import type { Diagnostic } from '@codemirror/lint';
import { parse, type ParseError } from 'jsonc-parser';
import { validateSiteSpec } from '@gridwright/shared/site-spec';
import { pointerToRange } from '@/lib/json-pointer-range';

export interface PointerIssue {
  pointer: string;
  message: string;
}

/** An issue as the editor lists it: once, with every check that found it. */
export interface SourcedIssue extends PointerIssue {
  source: string;
}

/**
 * One entry per pointer and message however many checks report it (the console's own check, the
 * API's Check, a refused Solve), its source naming them all, in the order first seen.
 */
export function mergeIssues(groups: { source: string; issues: PointerIssue[] }[]): SourcedIssue[] {
  const merged = new Map<string, { issue: PointerIssue; sources: string[] }>();
  for (const { source, issues } of groups) {
    for (const issue of issues) {
      const key = `${issue.pointer}\u0000${issue.message}`;
      const found = merged.get(key);
      if (!found) merged.set(key, { issue, sources: [source] });
      else if (!found.sources.includes(source)) found.sources.push(source);
    }
  }
  return [...merged.values()].map(({ issue, sources }) => ({ pointer: issue.pointer, message: issue.message, source: sources.join(' · ') }));
}

/** Places issues that carry JSON Pointers onto the editor text; the message names the pointer when it is not exact. */
export function issuesToDiagnostics(text: string, issues: (PointerIssue & { source?: string })[], source: string, severity: Diagnostic['severity'] = 'error'): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const issue of issues) {
    const range = pointerToRange(text, issue.pointer);
    if (!range) continue;
    out.push({
      from: range.from,
      to: Math.max(range.to, range.from + 1),
      severity,
      source: issue.source ?? source,
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
