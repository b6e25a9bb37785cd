import { writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { repoRoot } from './child-process';

export interface ResultRow {
  scenario: string;
  measure: string;
  value: string;
  pass: boolean | null;
}

export function machineDescription(): string {
  const cpus = os.cpus();
  return `${cpus.length} × ${cpus[0]?.model.trim() ?? 'unknown CPU'}, ${(os.totalmem() / 2 ** 30).toFixed(1)} GiB RAM, ${os.type()} ${os.release()}, Node ${process.version}`;
}

export function renderResults(rows: ResultRow[], startedAt: Date, seconds: number): string {
  const lines = [
    '# Soak results',
    '',
    `Measured ${startedAt.toISOString()} on ${machineDescription()} by \`npm run test:soak\` (${seconds.toFixed(0)} s). Loopback only.`,
    '',
    '| Scenario | Measure | Value | Pass |',
    '| --- | --- | --- | --- |',
    ...rows.map((r) => `| ${r.scenario} | ${r.measure} | ${r.value} | ${r.pass === null ? '—' : r.pass ? 'yes' : '**NO**'} |`),
    '',
  ];
  return lines.join('\n');
}

export function writeResults(markdown: string): string {
  const file = path.join(repoRoot, 'tests/soak/RESULTS.md');
  writeFileSync(file, markdown);
  return file;
}
