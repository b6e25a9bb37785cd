import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { studyComparisonSchema, studySchema } from '@gridwright/shared/studies';
import { startWorkers } from '../../../api/src/services/workers';
import { updateTenant } from '../../../api/src/services/tenants';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, slowSpec, smallSpec, waitForRun } from './run-helpers';

const grid = [
  { pointer: '/storage/0/capacityKwh', label: 'battery kWh', values: [100, 400] },
  { pointer: '/grid/importPrice', label: 'import price', values: [0.25, 0.4] },
];

async function counts(t: TestApp) {
  const [row] = await t.ctx.db.query(`SELECT (SELECT count(*)::int FROM studies) AS studies, (SELECT count(*)::int FROM runs) AS runs`);
  return row as { studies: number; runs: number };
}

describe('studies over a grid of changes', () => {
  let t: TestApp;
  let key: string;
  let tenantId: string;
  let workers: Awaited<ReturnType<typeof startWorkers>> | null = null;
  const post = (path: string, body: object) => request(t.app).post(path).set(bearer(key)).send(body);
  const get = (path: string) => request(t.app).get(path).set(bearer(key));

  beforeAll(async () => {
    t = await startTestApp(FAST_QUEUE_ENV);
    ({ apiKey: key, tenantId } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => {
    await workers?.stop();
    await t.close();
  });

  it('refuses a pointer the base spec does not have, naming the change, and creates nothing', async () => {
    const before = await counts(t);
    const res = await post('/v1/studies', { baseSpec: smallSpec(), changes: [grid[0], { pointer: '/storage/1/capacityKwh', values: [1] }] }).expect(400);
    expect(res.body.errors).toEqual([{ pointer: '/changes/1/pointer', message: expect.stringMatching(/\/storage has 1 entry/) }]);
    expect(await counts(t)).toEqual(before);
  });

  it('refuses a value that makes a combination invalid, naming the change, its value and the combination, and creates nothing', async () => {
    const before = await counts(t);
    // 100 kWh of initial SOC needs at least that much capacity: 50 breaks the combinations that use it.
    const res = await post('/v1/studies', { baseSpec: smallSpec(), changes: [{ ...grid[0], values: [400, 50] }, grid[1]] }).expect(400);
    // Initial and final SOC (both 100) no longer fit in combinations 2 and 3: each error once, at the value that broke it.
    expect(res.body.errors).toEqual([
      {
        pointer: '/changes/0/values/1',
        message: 'combination 2 (battery kWh=50, import price=0.25) and 1 other: /storage/0/initialSocKwh 100 must lie within [minSocKwh 0, capacityKwh 50]',
      },
      {
        pointer: '/changes/0/values/1',
        message: 'combination 2 (battery kWh=50, import price=0.25) and 1 other: /storage/0/finalSocKwh 100 must lie within [minSocKwh 0, capacityKwh 50]',
      },
    ]);
    const base = await post('/v1/studies', { baseSpec: { ...smallSpec(), horizon: { start: 'soon', stepMinutes: 60, steps: 8 } }, changes: grid }).expect(400);
    expect(base.body.errors[0].pointer).toBe('/baseSpec/horizon/start');
    expect(await counts(t)).toEqual(before);
  });

  it('holds a study to the plan: more runs than it allows at once is 422, more than the monthly runs left is 429', async () => {
    const before = await counts(t);
    await updateTenant(t.ctx, tenantId, { limitOverrides: { concurrentRuns: 3 } }, {});
    const tooWide = await post('/v1/studies', { baseSpec: smallSpec(), changes: grid }).expect(422);
    expect(tooWide.body.type).toBe('/problems/plan-concurrent-runs');
    await updateTenant(t.ctx, tenantId, { limitOverrides: { concurrentRuns: null, monthlyRuns: before.runs + 3 } }, {});
    const overQuota = await post('/v1/studies', { baseSpec: smallSpec(), changes: grid }).expect(429);
    expect(overQuota.body.type).toBe('/problems/quota-monthly-runs');
    expect(await counts(t)).toEqual(before);
    await updateTenant(t.ctx, tenantId, { limitOverrides: { monthlyRuns: null } }, {});
  });

  it('cancels every queued run of a study in one go', async () => {
    const res = await post('/v1/studies', { name: 'to cancel', baseSpec: slowSpec(1), changes: [{ pointer: '/storage/0/capacityKwh', values: [600, 900] }] }).expect(202);
    expect(res.body.progress).toMatchObject({ runsTotal: 2, queued: 2, runsDone: 0, percent: 0 });
    const cancelled = await post(`/v1/studies/${res.body.id}/cancel`, {}).expect(202);
    expect(cancelled.body.status).toBe('cancelled');
    expect(cancelled.body.runs.map((r: { status: string }) => r.status)).toEqual(['cancelled', 'cancelled']);
    const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM pgboss.job WHERE name = 'run-solve' AND state IN ('created', 'retry', 'active') AND data->>'runId' = ANY($1::text[])`, [
      cancelled.body.runs.map((r: { runId: string }) => r.runId),
    ]);
    expect(n).toBe(0);
  });

  it('runs a 2 × 2 grid on the workers and compares exactly what its four runs report', async () => {
    const usedBefore = (await get('/v1/usage').expect(200)).body.quota.runs.used;
    const res = await post('/v1/studies', { name: 'Sizing', baseSpec: smallSpec(), changes: grid }).expect(202);
    // Each of the four runs counts against the monthly runs quota.
    expect((await get('/v1/usage').expect(200)).body.quota.runs.used).toBe(usedBefore + 4);
    expect(studySchema.safeParse(res.body).error).toBeUndefined();
    expect(res.headers.location).toBe(`/v1/studies/${res.body.id}`);
    // The last change varies fastest.
    expect(res.body.runs.map((r: { values: unknown[] }) => r.values)).toEqual([[100, 0.25], [100, 0.4], [400, 0.25], [400, 0.4]]);
    expect(res.body.runs.map((r: { status: string }) => r.status)).toEqual(['queued', 'queued', 'queued', 'queued']);
    // Each is an ordinary run: its spec is the base spec with the combination's values, and it counts as a run.
    const third = await get(`/v1/runs/${res.body.runs[2].runId}`).expect(200);
    expect(third.body.study).toEqual({ id: res.body.id, position: 2 });
    const thirdSpec = await get(`/v1/runs/${res.body.runs[2].runId}/spec`).expect(200);
    expect(thirdSpec.body.storage[0].capacityKwh).toBe(400);
    expect(thirdSpec.body.grid.importPrice).toBe(0.25);
    expect(thirdSpec.body.name).toBe('Sizing · battery kWh=400, import price=0.25');

    workers = await startWorkers(t.ctx, { concurrency: 2 });
    const runs: any[] = [];
    for (const r of res.body.runs) runs.push(await waitForRun(t.app, key, r.runId));
    expect(runs.map((r) => r.status)).toEqual(['succeeded', 'succeeded', 'succeeded', 'succeeded']);

    const study = await get(`/v1/studies/${res.body.id}`).expect(200);
    expect(study.body.status).toBe('finished');
    expect(study.body.progress).toMatchObject({ runsTotal: 4, runsDone: 4, succeeded: 4, percent: 100 });
    expect(study.body.runs.every((r: { progress: { percent: number } }) => r.progress.percent === 100)).toBe(true);

    const comparison = await get(`/v1/studies/${res.body.id}/comparison`).expect(200);
    expect(studyComparisonSchema.safeParse(comparison.body).error).toBeUndefined();
    comparison.body.rows.forEach((row: any, i: number) => {
      const run = runs[i];
      expect(row).toMatchObject({ position: i, runId: run.id, status: 'succeeded', outcome: run.outcome, links: { run: `/v1/runs/${run.id}` } });
      expect(row.objective).toBe(run.objective.value);
      expect(row.objectiveTerms).toEqual(run.kpis.objectiveTerms);
      expect([row.importKwh, row.exportKwh, row.curtailedKwh, row.unservedKwh]).toEqual([run.kpis.importKwh, run.kpis.exportKwh, run.kpis.curtailedKwh, run.kpis.unservedKwh]);
      expect(row.starts).toBe(run.kpis.units['ely-1'].starts);
      expect(row.solverSeconds).toBe(run.solverSeconds);
    });
    const objectives = runs.map((r) => r.objective.value);
    expect(comparison.body.best).toBe(objectives.indexOf(Math.max(...objectives)));
    // A dearer import can only lower the optimum of the same site; a bigger battery can only raise it.
    expect(objectives[1]).toBeLessThanOrEqual(objectives[0] + 1e-6);
    expect(objectives[2]).toBeGreaterThanOrEqual(objectives[0] - 1e-6);

    const list = await get('/v1/studies').expect(200);
    expect(list.body.items.map((s: { id: string }) => s.id)).toContain(res.body.id);
    expect(list.body.items.find((s: { id: string }) => s.id === res.body.id).runs).toBeUndefined();
  });

  it("never shows one tenant another's study", async () => {
    const [study] = await t.ctx.db.query(`SELECT id FROM studies LIMIT 1`);
    const other = await createTenantWithKey(t.ctx);
    for (const path of [`/v1/studies/${study.id}`, `/v1/studies/${study.id}/comparison`]) {
      await request(t.app).get(path).set(bearer(other.apiKey)).expect(404);
    }
    await request(t.app).post(`/v1/studies/${study.id}/cancel`).set(bearer(other.apiKey)).expect(404);
  });
});
