// `npm test`: install what is missing, then lint, typecheck, build the console, and run every
// Vitest project (unit, integration on a throwaway PostgreSQL, browser). Exits non-zero on any failure.
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { buildConsole, ensureChromium, ensureNodeModules, ensureReferenceSolvers, log, root, run } from './lib/setup.mjs';
import { ensureCliBundle } from './lib/cli-bundle.mjs';
import { ensurePostgresInstalled } from './lib/postgres.mjs';

ensureNodeModules();
ensurePostgresInstalled(log);
process.env.CHROMIUM_PATH = ensureChromium();
ensureReferenceSolvers();
// Built before the tests, so the CLI tests that run it in parallel do not each build it.
await ensureCliBundle();

const steps = [
  ['lint', 'npx', ['eslint', '.', '--max-warnings=0']],
  ['typecheck', 'npm', ['run', '--silent', 'typecheck']],
  ['console build', null, null],
  ['vitest', 'npx', ['vitest', 'run', '--reporter=default', '--reporter=json', '--outputFile.json=test-artifacts/vitest.json']],
];

mkdirSync(path.join(root, 'test-artifacts'), { recursive: true });
const failed = [];
for (const [name, cmd, args] of steps) {
  log(`── ${name}`);
  let code;
  if (name === 'console build') {
    try { buildConsole(); code = 0; } catch { code = 1; }
  } else {
    code = run(cmd, args, { env: { ...process.env, CI: process.env.CI ?? '' } });
  }
  if (code !== 0) failed.push(name);
}

const report = path.join(root, 'test-artifacts', 'vitest.json');
let passed = 0;
let failedTests = 0;
if (existsSync(report)) {
  const json = JSON.parse(readFileSync(report, 'utf8'));
  passed = json.numPassedTests ?? 0;
  failedTests = json.numFailedTests ?? 0;
}
// A failed step outside Vitest (lint, typecheck, build) counts as one failure in the closing line.
const failedOutsideVitest = failed.filter((name) => name !== 'vitest').length;
if (failed.length) log(`failed steps: ${failed.join(', ')}`);
process.stdout.write(`\n${passed} passed, ${failedTests + failedOutsideVitest} failed\n`);
process.exit(failed.length ? 1 : 0);
