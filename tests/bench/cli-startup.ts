// The bench's CLI section: the fixed cost of an offline solve, a one-step spec as a whole process
// (`npm run --silent solve -- spec.json`, npm included), against the same CLI run from its
// TypeScript source under tsx (how `npm run solve` ran it before it was bundled) and against
// starting bare node.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

export interface CliRow {
  variant: string;
  wallS: number;
  note: string;
}

const root = path.resolve(import.meta.dirname, '../..');

/** A one-step site: the solve itself is trivial, so the time is the CLI's own. */
const ONE_STEP = {
  horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 1 },
  supply: { availableKw: [10] },
  siteLoad: { kw: [5] },
  grid: { importLimitKw: 10, exportLimitKw: 10, importPrice: 0.2, exportPrice: 0.05 },
};

function medianSeconds(repeats: number, cmd: string, args: string[]): number {
  const times: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const started = performance.now();
    execFileSync(cmd, args, { cwd: root, stdio: ['ignore', 'ignore', 'inherit'] });
    times.push((performance.now() - started) / 1000);
  }
  times.sort((a, b) => a - b);
  return times[times.length >> 1];
}

export function cliSection(opts: { quick: boolean; log: (line: string) => void }): { rows: CliRow[]; summary: string[] } {
  const repeats = opts.quick ? 3 : 9;
  const dir = mkdtempSync(path.join(os.tmpdir(), 'gridwright-bench-cli-'));
  try {
    const spec = path.join(dir, 'one-step.json');
    writeFileSync(spec, JSON.stringify(ONE_STEP));
    opts.log('cli: one-step spec');
    // The first run builds the bundle if a source changed, and writes V8's code cache.
    execFileSync('npm', ['run', '--silent', 'solve', '--', spec], { cwd: root, stdio: 'ignore' });
    const bundled = medianSeconds(repeats, 'npm', ['run', '--silent', 'solve', '--', spec]);
    const direct = medianSeconds(repeats, process.execPath, ['scripts/solve.mjs', spec]);
    const fromSource = medianSeconds(Math.min(repeats, 5), process.execPath, ['--import', 'tsx', 'api/src/cli/solve.ts', spec]);
    const bareNode = medianSeconds(repeats, process.execPath, ['-e', '0']);
    const rows: CliRow[] = [
      { variant: '`npm run --silent solve -- one-step.json`', wallS: bundled, note: `median of ${repeats}; target ≤ 0.5 s` },
      { variant: '`node scripts/solve.mjs one-step.json` (without npm)', wallS: direct, note: `median of ${repeats}` },
      { variant: 'the CLI from source under tsx, as before', wallS: fromSource, note: `median of ${Math.min(repeats, 5)}; ${(fromSource / direct).toFixed(1)}× the bundle without npm` },
      { variant: '`node -e 0`', wallS: bareNode, note: `median of ${repeats}` },
    ];
    return {
      rows,
      summary: [`CLI fixed cost (one-step spec, whole process): ${bundled.toFixed(2)} s through npm, ${direct.toFixed(2)} s without npm, ${fromSource.toFixed(2)} s from source under tsx — target ≤ 0.5 s ${bundled <= 0.5 ? 'met' : 'NOT met'}.`],
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
