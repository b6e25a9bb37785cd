import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runSchema } from '@gridwright/shared/run-result';
import { revisionChainSchema, revisionDiffSchema } from '@gridwright/shared/revisions';
import { startWorkers } from '../../../api/src/services/workers';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, waitForRun } from './run-helpers';

/**
 * A site small enough to solve by hand. Four hourly steps, 100 kW of load each, no on-site supply;
 * the grid imports at most 200 kW at 0.1, 0.1, 0.5 and 0.6 per kWh. A battery of 200 kWh (100 kW
 * either way, lossless) starts empty. A generator (50–100 kW at 0.55 per kWh, 100 per start, on
 * for at least 3 steps once started) starts off.
 *
 * The plan, by hand: the expensive hours need 200 kWh, so the battery charges 100 kW in each cheap
 * hour (import 200 kW, the limit) and discharges 100 kW in each expensive one (import 0). The
 * generator never pays for its start: 0.55 a kWh plus 100 beats no saving the battery leaves.
 * Objective −(0.1·200 + 0.1·200) = −40.
 */
const spec = {
  name: 'Hand-solved yard',
  horizon: { start: '2027-03-01T06:00:00+01:00', stepMinutes: 60, steps: 4 },
  supply: { availableKw: [0, 0, 0, 0] },
  siteLoad: { kw: [100, 100, 100, 100] },
  grid: { importLimitKw: 200, exportLimitKw: 0, importPrice: [0.1, 0.1, 0.5, 0.6], exportPrice: 0 },
  units: [{ id: 'gen-1', kind: 'generator', ratingKw: 100, minStableKw: 50, costPerKwh: 0.55, startupCost: 100, minUpSteps: 3 }],
  storage: [{ id: 'bess-1', capacityKwh: 200, maxChargeKw: 100, maxDischargeKw: 100, initialSocKwh: 0 }],
  solver: { timeLimitSeconds: 20, mipGap: 0 },
};

/**
 * The re-plan from step 2 (08:00) with what was measured: the battery holds only 50 kWh, and the
 * generator was started an hour ago and runs at 50 kW. By hand: having been on 1 step of its 3,
 * it stays on through steps 2 and 3 at ≥ 50 kW, with no start to pay. Step 3's 100 kW are best met
 * by the generator's 50 (0.55 < 0.6) and the battery's whole 50 kWh (saving 0.6); step 2's other
 * 50 kW are imported at 0.5 (the generator above its minimum costs 0.55; charging for step 3 would
 * find no room there, its 100 kW being taken). Every other split costs more (battery at step 2
 * instead: 85; generator at 100 in step 3: 82.5). Objective −(0.5·50 + 0.55·50 + 0.55·50) = −80.
 * The parent's remainder (discharging 100 kW twice from 50 kWh) is not possible any more.
 */
const measured = {
  from: '2027-03-01T08:00:00+01:00',
  state: { storage: { 'bess-1': { socKwh: 50 } }, units: { 'gen-1': { on: true, stepsInState: 1, powerKw: 50 } } },
};

describe('re-plans from measured state', () => {
  let t: TestApp;
  let key: string;
  let workers: Awaited<ReturnType<typeof startWorkers>>;
  let parentId: string;
  let replanId: string;
  const post = (path: string, body: object) => request(t.app).post(path).set(bearer(key)).send(body);
  const get = (path: string) => request(t.app).get(path).set(bearer(key));

  beforeAll(async () => {
    t = await startTestApp(FAST_QUEUE_ENV);
    key = (await createTenantWithKey(t.ctx)).apiKey;
    workers = await startWorkers(t.ctx, { concurrency: 2 });
    const res = await post('/v1/runs', spec).expect(202);
    parentId = res.body.id;
  });
  afterAll(async () => {
    await workers.stop();
    await t.close();
  });

  it('solves the parent as derived by hand', async () => {
    const parent = await waitForRun(t.app, key, parentId);
    expect(parent.status).toBe('succeeded');
    expect(parent.objective.value).toBeCloseTo(-40, 6);
    expect(parent.schedule.storage['bess-1'].chargeKw).toEqual([100, 100, 0, 0]);
    expect(parent.schedule.storage['bess-1'].dischargeKw).toEqual([0, 0, 100, 100]);
    expect(parent.schedule.units['gen-1'].on).toEqual([0, 0, 0, 0]);
    expect(parent.revision).toBeNull();
  });

  it('refuses to re-plan a run without a schedule', async () => {
    // 100 kW of hard load behind a 10 kW connection and nothing else: infeasible, so no schedule.
    const infeasible = await post('/v1/runs', { ...spec, name: 'no schedule', grid: { ...spec.grid, importLimitKw: 10 }, units: [], storage: [] }).expect(202);
    expect((await waitForRun(t.app, key, infeasible.body.id)).outcome).toBe('infeasible');
    const res = await post(`/v1/runs/${infeasible.body.id}/replans`, { from: 1 }).expect(409);
    expect(res.body.type).toBe('/problems/no-schedule');
  });

  it('re-plans from the measured state to a different schedule, derived by hand', async () => {
    const res = await post(`/v1/runs/${parentId}/replans`, measured).expect(202);
    expect(res.headers.location).toBe(`/v1/runs/${res.body.id}`);
    replanId = res.body.id;
    expect(res.body.revision).toEqual({ parentId, rootId: parentId, fromStep: 2, rootStep: 2 });
    const done = await waitForRun(t.app, key, replanId);
    expect(runSchema.safeParse(done).error).toBeUndefined();
    expect(done.status).toBe('succeeded');
    // The polled read (a prepared statement, kept once final) shows the chain like the answer to the POST.
    expect(done.revision).toEqual(res.body.revision);
    expect(done.objective.value).toBeCloseTo(-80, 6);
    expect(done.schedule.timestamps).toEqual(['2027-03-01T08:00:00+01:00', '2027-03-01T09:00:00+01:00']);
    expect(done.schedule.units['gen-1'].on).toEqual([1, 1]);
    expect(done.schedule.units['gen-1'].powerKw).toEqual([50, 50]);
    expect(done.schedule.storage['bess-1'].dischargeKw).toEqual([0, 50]);
    expect(done.schedule.grid.importKw).toEqual([50, 0]);
    expect(done.kpis.units['gen-1'].starts).toBe(0);

    const child = await get(`/v1/runs/${replanId}/spec`).expect(200);
    expect(child.body.horizon).toEqual({ start: '2027-03-01T08:00:00+01:00', stepMinutes: 60, steps: 2 });
    expect(child.body.storage[0].initialSocKwh).toBe(50);
    expect(child.body.units[0].initial).toEqual({ on: true, stepsInState: 1, powerKw: 50 });
    expect(child.body.grid.importPrice).toEqual([0.5, 0.6]);
    expect(child.body.siteLoad.kw).toEqual([100, 100]);
  });

  it('exports only the steps from the re-plan time on', async () => {
    const csv = await get(`/v1/runs/${replanId}/schedule?format=csv`).expect(200);
    const rows: Record<string, string>[] = parse(csv.text, { columns: true });
    expect(rows.map((r) => r.timestamp)).toEqual(['2027-03-01T07:00:00Z', '2027-03-01T08:00:00Z']);
    expect(rows.map((r) => Number(r['bess-1.dischargeKw']))).toEqual([0, 50]);
  });

  it('takes what the request leaves out from the plan', async () => {
    // From step 2 as planned: 200 kWh stored, the generator off since the start; the remainder is the parent's.
    const res = await post(`/v1/runs/${parentId}/replans`, { from: 2 }).expect(202);
    const done = await waitForRun(t.app, key, res.body.id);
    expect(done.objective.value).toBeCloseTo(0, 6);
    expect(done.schedule.storage['bess-1'].dischargeKw).toEqual([100, 100]);
    const child = await get(`/v1/runs/${res.body.id}/spec`).expect(200);
    expect(child.body.storage[0].initialSocKwh).toBe(200);
    // Off for steps 0 and 1 and for ever before: the resolved "forever" (3 steps, its minimum up time) plus 2.
    expect(child.body.units[0].initial).toEqual({ on: false, stepsInState: 5 });
  });

  it('shows the planned state a re-plan starts from by default', async () => {
    const expected = {
      from: 2,
      startsAt: '2027-03-01T08:00:00+01:00',
      state: { storage: { 'bess-1': { socKwh: 200 } }, stores: {}, units: { 'gen-1': { on: false, stepsInState: 5, powerKw: null } }, demandCharges: {} },
    };
    expect((await get(`/v1/runs/${parentId}/planned-state?at=2`).expect(200)).body).toEqual(expected);
    expect((await get(`/v1/runs/${parentId}/planned-state?at=${encodeURIComponent('2027-03-01T07:00:00Z')}`).expect(200)).body).toEqual(expected);
    // By default the step under way now; the horizon lies wholly before or after the clock, so it is the first or the last.
    const byDefault = await get(`/v1/runs/${parentId}/planned-state`).expect(200);
    expect(byDefault.body.from).toBe(Date.now() < Date.parse(spec.horizon.start) ? 0 : 3);
    const refused = await get(`/v1/runs/${parentId}/planned-state?at=${encodeURIComponent('2027-03-01T07:10:00Z')}`).expect(400);
    expect(refused.body.errors[0].pointer).toBe('/query/at');
  });

  it('lists the chain and re-plans a re-plan, counting steps in the first horizon', async () => {
    const res = await post(`/v1/runs/${replanId}/replans`, { from: 1, state: { storage: { 'bess-1': { socKwh: 10 } } } }).expect(202);
    expect(res.body.revision).toEqual({ parentId: replanId, rootId: parentId, fromStep: 1, rootStep: 3 });
    await waitForRun(t.app, key, res.body.id);
    const chain = await get(`/v1/runs/${res.body.id}/revisions`).expect(200);
    expect(revisionChainSchema.safeParse(chain.body).error).toBeUndefined();
    expect(chain.body.rootId).toBe(parentId);
    expect(chain.body.items[0]).toMatchObject({ id: parentId, parentId: null, fromStep: null, rootStep: 0, steps: 4 });
    expect(chain.body.items.map((i: { rootStep: number }) => i.rootStep)).toEqual([0, 2, 2, 3]);
    expect(chain.body.items.at(-1)).toMatchObject({ id: res.body.id, parentId: replanId, startsAt: '2027-03-01T09:00:00+01:00', steps: 1 });
  });

  it('shows what changed between two revisions (by default its parent), step by step, priced alike', async () => {
    const res = await get(`/v1/runs/${replanId}/revision-diff?base=${parentId}`).expect(200);
    expect(revisionDiffSchema.safeParse(res.body).error).toBeUndefined();
    expect(res.body).toMatchObject({ fromRootStep: 2, valuedWith: replanId, base: { id: parentId, rootStep: 0 }, revision: { id: replanId, rootStep: 2 } });
    const column = (k: string) => res.body.setpoints.find((s: { key: string }) => s.key === k);
    expect(column('bess-1.dischargeKw')).toMatchObject({ unit: 'kW', base: [100, 100], revision: [0, 50], changedSteps: 2, largestChange: 100 });
    expect(column('gen-1.on')).toMatchObject({ unit: 'on/off', base: [0, 0], revision: [1, 1], changedSteps: 2 });
    expect(column('grid.exportKw')).toMatchObject({ changedSteps: 0, largestChange: 0 });
    // Marginal values are prices the solve reports, not setpoints: the export has them, the difference does not.
    const csv = await get(`/v1/runs/${replanId}/schedule?format=csv`).expect(200);
    expect(csv.text.split(/\r?\n/)[0]).toContain('site.marginalValuePerKwh');
    expect(column('site.marginalValuePerKwh')).toBeUndefined();
    // Hand-priced on the re-plan's spec: the parent's remainder imports nothing and runs no unit (0);
    // the re-plan pays 0.5·50 for import and 0.55·100 for the generator's energy (−80), no start.
    expect(res.body.objective.base.total).toBeCloseTo(0, 6);
    expect(res.body.objective.revision.terms.energy).toBeCloseTo(-80, 6);
    expect(res.body.objective.revision.terms.starts).toBe(0);
    expect(res.body.objective.change.total).toBeCloseTo(-80, 6);
    const byDefault = await get(`/v1/runs/${replanId}/revision-diff`).expect(200);
    expect(byDefault.body).toEqual(res.body);
    const noParent = await get(`/v1/runs/${parentId}/revision-diff`).expect(409);
    expect(noParent.body.type).toBe('/problems/no-parent');
    const reversed = await get(`/v1/runs/${parentId}/revision-diff?base=${replanId}`).expect(200);
    expect(reversed.body.valuedWith).toBe(replanId);
    expect(reversed.body.objective.change.total).toBeCloseTo(80, 6);
  });

  it('refuses a revision of another chain as the base', async () => {
    const other = await post('/v1/runs', { ...spec, name: 'another chain' }).expect(202);
    await waitForRun(t.app, key, other.body.id);
    const res = await get(`/v1/runs/${replanId}/revision-diff?base=${other.body.id}`).expect(400);
    expect(res.body.errors[0].pointer).toBe('/query/base');
  });

  it('names the field of a measured value or a re-plan time the parent cannot take', async () => {
    const refused = async (body: object, pointer: string, message: RegExp) => {
      const res = await post(`/v1/runs/${parentId}/replans`, body);
      expect(res.status, JSON.stringify(res.body)).toBe(400);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
      expect(res.body.errors).toEqual([expect.objectContaining({ pointer, message: expect.stringMatching(message) })]);
    };
    await refused({ from: '2027-03-01T08:30:00+01:00' }, '/from', /not a step boundary/);
    await refused({ from: '2027-03-01T10:00:00+01:00' }, '/from', /outside/);
    await refused({ from: 4 }, '/from', /past the parent's last step, 3/);
    await refused({ from: 2, state: { storage: { 'bess-1': { socKwh: 250 } } } }, '/state/storage/bess-1/socKwh', /capacityKwh 200/);
    await refused({ from: 2, state: { units: { 'gen-1': { on: true, stepsInState: 1, powerKw: 120 } } } }, '/state/units/gen-1/powerKw', /ratingKw 100/);
    await refused({ from: 2, state: { units: { 'gen-1': { on: true } } } }, '/state/units/gen-1/stepsInState', /required/);
    await refused({ from: 2, state: { storage: { 'bess-9': { socKwh: 5 } } } }, '/state/storage/bess-9', /no battery "bess-9"/);
    await refused({ from: 2, series: { siteLoadKw: [100, 100, 100] } }, '/series/siteLoadKw', /has 3 values; horizon.steps is 2/);
    await refused({ from: 2, state: { demandCharges: {} }, tenantId: 'x' }, '/tenantId', /./);
  });

  it('replays an Idempotency-Key for the same parent and body, and counts the re-plan in the quota', async () => {
    const [{ n: before }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM runs`);
    const body = { from: 3, state: { storage: { 'bess-1': { socKwh: 80 } } } };
    const first = await post(`/v1/runs/${parentId}/replans`, body).set('Idempotency-Key', 'replan-once').expect(202);
    const again = await post(`/v1/runs/${parentId}/replans`, body).set('Idempotency-Key', 'replan-once').expect(202);
    expect(again.body.id).toBe(first.body.id);
    expect(again.headers['idempotent-replayed']).toBe('true');
    const other = await post(`/v1/runs/${replanId}/replans`, { ...body, from: 1 }).set('Idempotency-Key', 'replan-once');
    expect(other.status).toBe(422);
    const [{ n: after }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM runs`);
    expect(after).toBe(before + 1);
    const usage = await get('/v1/usage').expect(200);
    expect(usage.body.quota.runs.used).toBe(after);
  });
});
