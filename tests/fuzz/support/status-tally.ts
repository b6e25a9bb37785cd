import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, expect } from 'vitest';

/**
 * How often each HTTP status answered each fuzz test: the README's fuzz figures. Each fuzz file
 * writes its tally to test-artifacts/fuzz-statuses/<file>.json when it ends.
 */
const tally = new Map<string, Map<number, number>>();

export function countStatus(status: number): void {
  const test = expect.getState().currentTestName ?? 'unnamed';
  const byStatus = tally.get(test) ?? new Map<number, number>();
  byStatus.set(status, (byStatus.get(status) ?? 0) + 1);
  tally.set(test, byStatus);
}

afterAll(() => {
  if (tally.size === 0) return;
  const testPath = expect.getState().testPath ?? 'unknown';
  const dir = path.resolve(import.meta.dirname, '../../../test-artifacts/fuzz-statuses');
  mkdirSync(dir, { recursive: true });
  const out = Object.fromEntries([...tally].map(([test, byStatus]) => [test, Object.fromEntries([...byStatus].sort(([a], [b]) => a - b))]));
  writeFileSync(path.join(dir, `${path.basename(testPath, '.ts')}.json`), JSON.stringify(out, null, 2) + '\n');
});
