// 5 000 consecutive small solves in one process: no crash, memory bounded (RSS reported).
import { spawnTs } from '../lib/child-process';
import type { ResultRow } from '../lib/results';

export async function manySolvesScenario(count: number): Promise<ResultRow[]> {
  const child = spawnTs('tests/soak/lib/many-solves.ts', {}, 'many-solves', [String(count)]);
  const [, json] = await child.waitForLine(/RESULT (\{.*\})/, 60 * 60_000).catch((err: Error) => {
    throw new Error(`the solving process failed: ${child.output().trim().split('\n').slice(-3).join(' | ').slice(0, 400) || err.message}`);
  });
  await child.exited;
  const r = JSON.parse(json) as { n: number; failures: number; seconds: number; rssMiB: number[] };
  const first = r.rssMiB[1] ?? r.rssMiB[0];
  const last = r.rssMiB[r.rssMiB.length - 1];
  return [
    { scenario: `${r.n} consecutive small solves, one process`, measure: 'solves not optimal / crashes', value: `${r.failures} / 0`, pass: r.failures === 0 },
    { scenario: `${r.n} consecutive small solves, one process`, measure: 'RSS (MiB) after the first solve, then every tenth', value: r.rssMiB.join(' → '), pass: last <= first * 1.5 + 50 },
    { scenario: `${r.n} consecutive small solves, one process`, measure: 'wall time', value: `${r.seconds.toFixed(0)} s (${((r.seconds / r.n) * 1000).toFixed(1)} ms per solve)`, pass: null },
  ];
}
