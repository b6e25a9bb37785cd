import { buildPointer } from '@gridwright/shared/json-pointer';

/** One row of the grid editor as typed: the values one JSON value per line. */
export interface ChangeRow {
  pointer: string;
  label: string;
  valuesText: string;
}

const MAX_SUGGESTIONS = 300;

/**
 * Pointers worth varying in a spec, for the editor's suggestions: every number, true/false and
 * short text, and every list of numbers shorter than `maxList` (a per-step price is varied whole).
 */
export function suggestPointers(spec: unknown, maxList = 48): string[] {
  const out: string[] = [];
  const walk = (node: unknown, path: (string | number)[]) => {
    if (out.length >= MAX_SUGGESTIONS) return;
    if (typeof node === 'number' || typeof node === 'boolean') {
      out.push(buildPointer(path));
    } else if (Array.isArray(node)) {
      if (node.length && node.length <= maxList && node.every((v) => typeof v === 'number')) out.push(buildPointer(path));
      else if (!node.every((v) => typeof v === 'number')) node.forEach((v, i) => walk(v, [...path, i]));
    } else if (node && typeof node === 'object') {
      for (const [k, v] of Object.entries(node)) walk(v, [...path, k]);
    }
  };
  walk(spec, []);
  return out;
}

/** The values of a row: one JSON value per non-empty line, or the line that is not JSON. */
export function parseValues(text: string): { ok: true; values: unknown[] } | { ok: false; line: number; message: string } {
  const values: unknown[] = [];
  const lines = text.split('\n');
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i].trim();
    if (!line) continue;
    try {
      values.push(JSON.parse(line));
    } catch {
      return { ok: false, line: i + 1, message: `line ${i + 1} is not a JSON value (numbers as 250, texts in "quotes", lists as [0.2, 0.3])` };
    }
  }
  return { ok: true, values };
}

/** How many runs the grid makes: the product of its value counts (0 while a row has none). */
export function combinationCount(rows: ChangeRow[]): number {
  return rows.reduce((n, row) => {
    const parsed = parseValues(row.valuesText);
    return n * (parsed.ok ? parsed.values.length : 0);
  }, 1);
}

/** "0.24" for a number, the JSON shortened for anything else: how a value reads in a table. */
export function valueLabel(value: unknown): string {
  const text = JSON.stringify(value) ?? 'null';
  return text.length > 24 ? `${text.slice(0, 23)}…` : text;
}
