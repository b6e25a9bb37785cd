import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runResultSchema } from '@gridwright/shared/run-result';

const root = path.resolve(import.meta.dirname, '../..');
const tsx = path.join(root, 'node_modules/.bin/tsx');
const reference = (file: string) => `/work/shared/reference-cases/${file}`;

function solve(args: string[], input?: string) {
  const r = spawnSync(tsx, ['api/src/cli/solve.ts', ...args], { cwd: root, input, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('solve CLI', () => {
  it('prints the result and exits 0 (sparse-set-gap: optimum 780 by the reference derivation)', () => {
    const r = solve([reference('sparse-set-gap.json')]);
    expect(r.code).toBe(0);
    const result = JSON.parse(r.stdout);
    expect(result).toMatchObject({ status: 'succeeded', outcome: 'optimal', model: { mode: 'monolithic' } });
    expect(result.objective.value).toBeCloseTo(780, 6);
    // The result is what SPEC.md §3 and the schema openapi.yaml is generated from describe.
    expect(runResultSchema.strict().safeParse(result).error).toBeUndefined();
  });

  it('reads stdin, honours --mode and --no-reductions', () => {
    const spec = JSON.stringify({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 3 },
      supply: { availableKw: [1, 2, 3] },
      units: [{ id: 'u', kind: 'flexible-load', ratingKw: 2, valuePerKwh: 1 }],
    });
    const r = solve(['-', '--mode', 'rolling', '--no-reductions'], spec);
    expect(r.code).toBe(0);
    const result = JSON.parse(r.stdout);
    expect(result.model.mode).toBe('rolling');
    expect(result.model.reductions).toEqual({ sparseSets: false, tightBigM: false, scaling: false, relaxExclusivity: false, independentBlocks: false });
    // Hand check: the load takes min(supply, 2 kW) at value 1: 1 + 2 + 2 = 5.
    expect(result.objective.value).toBeCloseTo(5, 9);
  });

  it('prints the schedule as CSV with --csv', () => {
    const r = solve([reference('battery-arbitrage.json'), '--csv']);
    expect(r.code).toBe(0);
    // The API's CSV with its default options (services/schedule-csv.ts), RFC 4180 CRLF rows: the v1 columns, then
    // the marginal value of energy.
    const lines = r.stdout.trim().split('\r\n');
    expect(lines[0]).toBe('timestamp,site.supplyUsedKw,site.curtailedKw,site.unservedKw,grid.importKw,grid.exportKw,b.chargeKw,b.dischargeKw,b.socKwh,site.marginalValuePerKwh');
    expect(lines).toHaveLength(5);
    // Reference case: charge 2 000 kW from the grid at step 0 (README of the reference cases). One more kWh on site
    // at step 0 would replace a kWh imported at 0.02, so that is its marginal value.
    expect(lines[1]).toBe('2027-01-01T00:00:00Z,0,0,0,2000,0,2000,0,1800,0.02');
  });

  it("writes the steps in the horizon's local time across a daylight-saving change", () => {
    // Vienna moves its clocks from 02:00 +01:00 to 03:00 +02:00 on Sunday 28 March 2027 (EU rule: the last Sunday
    // of March), so the four hourly steps from midnight start at 00:00 and 01:00 +01:00, then 03:00 and 04:00 +02:00.
    const spec = JSON.stringify({
      horizon: { start: '2027-03-28T00:00:00+01:00', stepMinutes: 60, steps: 4, timeZone: 'Europe/Vienna' },
      supply: { availableKw: [1, 2, 3, 4] },
      units: [{ id: 'u', kind: 'flexible-load', ratingKw: 2, valuePerKwh: 1 }],
    });
    const r = solve(['-', '--csv'], spec);
    expect(r.code).toBe(0);
    const rows = r.stdout.trim().split('\r\n').map((line) => line.split(','));
    expect(rows.slice(1).map((row) => row[0])).toEqual(['2027-03-28T00:00:00+01:00', '2027-03-28T01:00:00+01:00', '2027-03-28T03:00:00+02:00', '2027-03-28T04:00:00+02:00']);
    // Hand check of the last column: at step 0 the 2 kW load takes all 1 kW of supply, so one more kWh is worth its
    // value, 1; from step 1 the load is at its rating and more supply would be curtailed, worth 0.
    expect(rows.slice(1).map((row) => Number(row[row.length - 1]))).toEqual([1, 0, 0, 0]);
  });

  it('exits 0 for an infeasible spec: an outcome, not an error', () => {
    const spec = JSON.stringify({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 2 },
      supply: { availableKw: [0, 0] },
      siteLoad: { kw: [5, 5] },
    });
    const r = solve(['-'], spec);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).outcome).toBe('infeasible');
  });

  it('exits 2 with problem+json on stderr for an invalid spec', () => {
    const r = solve(['-'], JSON.stringify({ horizon: { start: 'x', stepMinutes: 60, steps: 2 }, supply: { availableKw: [0] } }));
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    const problem = JSON.parse(r.stderr);
    expect(problem).toMatchObject({ type: '/problems/validation-failed', status: 400 });
    expect(problem.errors.map((e: { pointer: string }) => e.pointer)).toContain('/horizon/start');
  });

  it('exits 2 for input that is not JSON and for bad options', () => {
    expect(solve(['-'], '{nope').code).toBe(2);
    expect(solve([reference('sparse-set-gap.json'), '--mode', 'sideways']).code).toBe(2);
  });
});
