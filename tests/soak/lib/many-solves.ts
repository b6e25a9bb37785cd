// Child process: N consecutive small solves through one solver pool, as one worker process does
// them. Prints RSS every `every` solves and a final JSON line.
import { resolveDefaults, validateSiteSpec } from '../../../shared/src/site-spec';
import { solveSite } from '../../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../../api/src/solver/highs-solver-pool';
import { smallSiteSpec } from './specs';

const n = Number(process.argv[2] ?? 5000);
const every = Math.max(1, Math.floor(n / 10));
const checked = validateSiteSpec(smallSiteSpec('rss soak'));
if (!checked.ok) throw new Error('the soak spec does not validate');
const spec = resolveDefaults(checked.spec);
const solver = new HighsSolverPool();
const rss: number[] = [];
let failures = 0;
const started = Date.now();
for (let i = 1; i <= n; i++) {
  const result = await solveSite(spec, { solver });
  if (result.outcome !== 'optimal') failures++;
  if (i % every === 0 || i === 1) rss.push(process.memoryUsage().rss);
}
await solver.close();
process.stdout.write(`RESULT ${JSON.stringify({ n, failures, seconds: (Date.now() - started) / 1000, rssMiB: rss.map((b) => Math.round(b / 2 ** 20)) })}\n`);
process.exit(0);
