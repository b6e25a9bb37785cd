// `npm run solve`: the offline solve CLI (api/src/cli/solve.ts), bundled (scripts/lib/cli-bundle.mjs).
import { runCli } from './lib/cli-bundle.mjs';

await runCli();
