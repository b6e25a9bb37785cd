import { escapeToken, parsePointer } from '@gridwright/shared/json-pointer';
import { STUDY_MAX_RUNS, type StudyChange } from '@gridwright/shared/studies';
import type { SpecIssue } from '@gridwright/shared/site-spec';

/** A change as a study keeps it: its label filled in. */
export interface GridChange {
  pointer: string;
  label: string;
  values: unknown[];
}

const ARRAY_INDEX = /^(0|[1-9]\d*)$/;
const MAX_NAME = 200;
const MAX_VALUE_IN_NAME = 40;

export const labelled = (changes: StudyChange[]): GridChange[] => changes.map((c) => ({ pointer: c.pointer, label: c.label ?? c.pointer, values: c.values }));

/** How many combinations the grid has: the product of its lists. */
export const combinationCount = (changes: GridChange[]) => changes.reduce((n, c) => n * c.values.length, 1);

/** Which value of each change combination `position` takes; the last change varies fastest. */
export function combinationAt(changes: GridChange[], position: number): number[] {
  const picks = new Array<number>(changes.length);
  let rest = position;
  for (let i = changes.length - 1; i >= 0; i--) {
    picks[i] = rest % changes[i].values.length;
    rest = Math.floor(rest / changes[i].values.length);
  }
  return picks;
}

/** Why the pointer's target does not exist in `doc`, or null when it does. */
function missingAt(doc: unknown, tokens: string[]): string | null {
  let node = doc;
  for (let i = 0; i < tokens.length; i++) {
    const token = tokens[i];
    const here = `/${tokens.slice(0, i).map(escapeToken).join('/')}`.replace(/\/$/, '') || 'the spec';
    if (Array.isArray(node)) {
      if (!ARRAY_INDEX.test(token) || Number(token) >= node.length) return `${here} has ${node.length} entr${node.length === 1 ? 'y' : 'ies'}; "${token}" is not one of them`;
      node = node[Number(token)];
    } else if (node && typeof node === 'object') {
      if (!Object.prototype.hasOwnProperty.call(node, token)) return `${here} has no field "${token}" in the base spec`;
      node = (node as Record<string, unknown>)[token];
    } else {
      return `${here} is a value, not an object or a list`;
    }
  }
  return null;
}

const startsWith = (tokens: string[], prefix: string[]) => prefix.length <= tokens.length && prefix.every((t, i) => tokens[i] === t);

/**
 * The grid's own rules, before any value is tried: each pointer names a field the base spec has,
 * no change sits inside another (one would overwrite the other), and the product of the lists is
 * at most STUDY_MAX_RUNS. Pointers into the request (`/changes/…`).
 */
export function gridIssues(base: unknown, changes: GridChange[]): SpecIssue[] {
  const issues: SpecIssue[] = [];
  const tokens = changes.map((c) => parsePointer(c.pointer));
  tokens.forEach((path, i) => {
    const missing = missingAt(base, path);
    if (missing) issues.push({ pointer: `/changes/${i}/pointer`, message: `${changes[i].pointer} does not exist in the base spec: ${missing}` });
    const other = tokens.findIndex((p, j) => j < i && (startsWith(path, p) || startsWith(p, path)));
    if (other >= 0) issues.push({ pointer: `/changes/${i}/pointer`, message: `overlaps change ${other} (${changes[other].pointer}): one would overwrite the other` });
  });
  const count = combinationCount(changes);
  if (count > STUDY_MAX_RUNS) issues.push({ pointer: '/changes', message: `the grid has ${count} combinations; a study may have at most ${STUDY_MAX_RUNS}` });
  return issues;
}

/** A short text of a value for names and messages. */
export function valueText(value: unknown): string {
  const text = JSON.stringify(value) ?? 'null';
  return text.length > MAX_VALUE_IN_NAME ? `${text.slice(0, MAX_VALUE_IN_NAME - 1)}…` : text;
}

/** "label=value, label=value" for one combination. */
export const combinationText = (changes: GridChange[], picks: number[]) => changes.map((c, i) => `${c.label}=${valueText(c.values[picks[i]])}`).join(', ');

/**
 * The base spec with one combination's values put at their pointers (which `gridIssues` has
 * checked), named after the study and the combination unless a change sets the name itself.
 */
export function combinationSpec(base: Record<string, unknown>, changes: GridChange[], picks: number[], studyName: string): Record<string, unknown> {
  const spec = structuredClone(base);
  spec.name = `${studyName} · ${combinationText(changes, picks)}`.slice(0, MAX_NAME);
  changes.forEach((change, i) => {
    const path = parsePointer(change.pointer);
    const parent = path.slice(0, -1).reduce<any>((node, token) => (Array.isArray(node) ? node[Number(token)] : node[token]), spec);
    const last = path[path.length - 1];
    if (Array.isArray(parent)) parent[Number(last)] = structuredClone(change.values[picks[i]]);
    else parent[last] = structuredClone(change.values[picks[i]]);
  });
  return spec;
}

/**
 * The change an error in a combination's spec is most likely about: the one whose pointer shares
 * the most leading tokens with the error's (a battery's capacity for its initial SOC), or null
 * when none shares any.
 */
export function changeBehind(changes: GridChange[], errorPointer: string): number | null {
  const error = parsePointer(errorPointer);
  let best: number | null = null;
  let bestShared = 0;
  changes.forEach((c, i) => {
    const path = parsePointer(c.pointer);
    let shared = 0;
    while (shared < path.length && shared < error.length && path[shared] === error[shared]) shared++;
    if (shared > bestShared) {
      best = i;
      bestShared = shared;
    }
  });
  return best;
}
