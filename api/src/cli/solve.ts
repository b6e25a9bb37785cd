/**
 * Offline solve: `npm run --silent solve -- <spec.json | -> [--mode monolithic|rolling] [--no-reductions] [--csv]`.
 * Prints the result (SPEC.md §3) or the schedule as CSV to stdout. Exit 0 whenever a result is
 * printed (infeasible included: an outcome, not an error); 2 for an invalid spec (problem+json
 * on stderr); 1 for an internal failure.
 */
import { readFile } from 'node:fs/promises';
import { parseArgs } from 'node:util';
import { resolveDefaults, validateSiteSpec } from '@gridwright/shared/site-spec';
import { solveSite } from '../engine/solve-site';
import { scheduleToCsv } from '../services/schedule-csv';
import { HttpProblem, validationProblem, type ProblemFieldError } from '../lib/problem';
import { HighsSolverPool } from '../solver/highs-solver-pool';
import { defaultSolverThreads } from '../solver/solver-threads';

const USAGE = 'usage: npm run --silent solve -- <spec.json | -> [--mode monolithic|rolling] [--no-reductions] [--csv]';

async function readInput(path: string): Promise<string> {
  if (path !== '-') return readFile(path, 'utf8');
  const chunks: Buffer[] = [];
  for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks).toString('utf8');
}

function invalid(errors: ProblemFieldError[], detail?: string): never {
  process.stderr.write(JSON.stringify(validationProblem(errors, detail).toBody(), null, 2) + '\n');
  process.exit(2);
}

function usageProblem(detail: string): never {
  const problem = new HttpProblem({ status: 400, slug: 'invalid-arguments', title: 'The command line is not valid', detail: `${detail}. ${USAGE}` });
  process.stderr.write(JSON.stringify(problem.toBody(), null, 2) + '\n');
  process.exit(2);
}

async function main(solver: HighsSolverPool): Promise<void> {
  let parsed;
  try {
    parsed = parseArgs({
      allowPositionals: true,
      options: { mode: { type: 'string' }, 'no-reductions': { type: 'boolean' }, csv: { type: 'boolean' } },
    });
  } catch (err) {
    usageProblem(err instanceof Error ? err.message : String(err));
  }
  const { values, positionals } = parsed;
  if (positionals.length !== 1) usageProblem('Give exactly one spec file, or - for stdin');
  if (values.mode !== undefined && values.mode !== 'monolithic' && values.mode !== 'rolling') {
    usageProblem(`--mode must be monolithic or rolling, not "${values.mode}"`);
  }

  let text: string;
  try {
    text = await readInput(positionals[0]);
  } catch (err) {
    usageProblem(`Cannot read ${positionals[0]}: ${err instanceof Error ? err.message : String(err)}`);
  }
  let input: unknown;
  try {
    input = JSON.parse(text);
  } catch (err) {
    invalid([{ pointer: '', message: `not valid JSON: ${err instanceof Error ? err.message : String(err)}` }], 'The spec is not valid JSON');
  }
  const checked = validateSiteSpec(input);
  if (!checked.ok) invalid(checked.errors);
  if (!('availableKw' in checked.spec.supply)) {
    invalid([{ pointer: '/supply/seriesId', message: 'the offline CLI cannot fetch uploaded series; give supply.availableKw inline' }]);
  }
  const spec = resolveDefaults(checked.spec);
  if (values.mode) spec.solver.mode = values.mode as 'monolithic' | 'rolling';
  if (values['no-reductions']) {
    for (const reduction of Object.keys(spec.solver.reductions) as (keyof typeof spec.solver.reductions)[]) spec.solver.reductions[reduction] = false;
  }

  const result = await solveSite(spec, { solver });
  if (values.csv) {
    // The same columns as GET /v1/runs/{id}/schedule?format=csv with its defaults.
    const csvDefaults = { powerUnit: 'kW', timestamps: 'offset', delimiter: ',', tagMap: {} } as const;
    const schedule = result.schedule ?? {
      timestamps: [],
      supplyUsedKw: [],
      curtailedKw: [],
      unservedKw: [],
      grid: { importKw: [], exportKw: [] },
      units: Object.fromEntries(spec.units.map((u) => [u.id, { on: [], powerKw: [] }])),
      storage: Object.fromEntries(spec.storage.map((s) => [s.id, { chargeKw: [], dischargeKw: [], socKwh: [] }])),
      stores: Object.fromEntries(spec.stores.map((s) => [s.id, { level: [], shortfall: [], spill: [] }])),
      reserve: null,
      marginalValues: { energyPerKwh: [], stores: {} },
    };
    process.stdout.write(scheduleToCsv(schedule, csvDefaults));
    if (!result.schedule) process.stderr.write(`outcome: ${result.outcome}; no schedule\n`);
  } else {
    // SPEC.md §3's result leads with the run's status: an offline solve that printed a result succeeded.
    process.stdout.write(JSON.stringify({ status: 'succeeded', ...result }, null, 2) + '\n');
  }
}

// No top-level await: the bundled CLI is a CommonJS script (scripts/lib/cli-bundle.mjs).
const solver = new HighsSolverPool({ size: defaultSolverThreads() });
main(solver)
  .then(() => solver.close())
  .then(
    () => {
      process.exitCode = 0;
    },
    (err: unknown) => {
      process.stderr.write(`solve failed: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}\n`);
      process.exit(1);
    },
  );
