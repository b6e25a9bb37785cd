import { execFile } from 'node:child_process';
import path from 'node:path';
import { promisify } from 'node:util';
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exampleSites } from '@gridwright/shared/examples';
import { runSchema } from '@gridwright/shared/run-result';
import { seedDemoRuns } from '../../../api/src/services/demo-runs';
import { startWorkers } from '../../../api/src/services/workers';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, smallSpec, waitForRun } from './run-helpers';

const root = path.resolve(import.meta.dirname, '../../..');

describe('a run through the queue', () => {
  let t: TestApp;
  let key: string;
  let tenantId: string;
  let workers: Awaited<ReturnType<typeof startWorkers>>;
  let runId: string;
  let demoRunIds: string[] = [];
  beforeAll(async () => {
    t = await startTestApp(FAST_QUEUE_ENV);
    ({ apiKey: key, tenantId } = await createTenantWithKey(t.ctx));
    workers = await startWorkers(t.ctx, { concurrency: 2 });
  });
  afterAll(async () => {
    await workers.stop();
    await t.close();
  });

  it('is accepted with 202 and a Location, then solved by the worker', async () => {
    const res = await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec());
    expect(res.status).toBe(202);
    expect(res.body.status).toBe('queued');
    expect(res.headers.location).toBe(`/v1/runs/${res.body.id}`);
    runId = res.body.id;
    const done = await waitForRun(t.app, key, runId);
    expect(done.status).toBe('succeeded');
    expect(done.outcome).toBe('optimal');
    expect(done.attempts).toBe(1);
    expect(done.startedAt).toBeTruthy();
    expect(done.finishedAt).toBeTruthy();
    expect(done.schedule.timestamps).toHaveLength(8);
    expect(done.progress.percent).toBe(100);
    // One window, reported even when the solve ends before the progress poll first writes.
    expect(done.progress).toMatchObject({ windowsDone: 1, windowsTotal: 1 });
    // What the API sends is what openapi.yaml's generated Run schema says, queued and finished.
    expect(runSchema.safeParse(res.body).error).toBeUndefined();
    expect(runSchema.safeParse(done).error).toBeUndefined();
    const spec = await request(t.app).get(`/v1/runs/${runId}/spec`).set(bearer(key)).expect(200);
    expect(spec.body).toMatchObject({ name: 'Test yard', horizon: smallSpec().horizon });
    const log = await request(t.app).get(`/v1/runs/${runId}/log`).set(bearer(key)).expect(200);
    expect(log.text).toMatch(/HiGHS/);
    // The list carries a finished run's objective and leaves its schedule to the run itself.
    const list = await request(t.app).get('/v1/runs').set(bearer(key)).expect(200);
    const listed = list.body.items.find((r: { id: string }) => r.id === runId);
    expect(listed.objective).toEqual(done.objective);
    expect(listed.schedule).toBeUndefined();
    expect(runSchema.safeParse(listed).error).toBeUndefined();
  });

  it('gives the same result as the CLI for the same demo spec', async () => {
    const example = exampleSites.find((e) => e.id === 'grid-electrolyser')!;
    const file = path.join(root, 'shared/examples', `${example.id}.json`);
    const { stdout } = await promisify(execFile)(process.execPath, ['--import', 'tsx', 'api/src/cli/solve.ts', file], { cwd: root, maxBuffer: 64 * 1024 * 1024 });
    const cli = JSON.parse(stdout);

    const res = await request(t.app).post('/v1/runs').set(bearer(key)).send(example.spec).expect(202);
    const api = await waitForRun(t.app, key, res.body.id, undefined, 60_000);
    expect(api.outcome).toBe(cli.outcome);
    expect(api.objective.value).toBeCloseTo(cli.objective.value, 6);
    expect(api.schedule).toEqual(cli.schedule);
    expect(api.kpis).toEqual(cli.kpis);
    expect(api.warnings).toEqual(cli.warnings);
    const counts = (m: any) => ({ mode: m.mode, variables: m.variables, binaries: m.binaries, binariesPruned: m.binariesPruned, constraints: m.constraints, nonzeros: m.nonzeros });
    expect(counts(api.model)).toEqual(counts(cli.model));
  });

  it('exports the schedule as RFC 4180 CSV equal to the JSON schedule', async () => {
    const json = await request(t.app).get(`/v1/runs/${runId}/schedule`).set(bearer(key)).expect(200);
    const s = json.body;
    const res = await request(t.app).get(`/v1/runs/${runId}/schedule?format=csv`).set(bearer(key)).expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.text).toContain('\r\n');
    const viaAccept = await request(t.app).get(`/v1/runs/${runId}/schedule`).set(bearer(key)).set('Accept', 'text/csv').expect(200);
    expect(viaAccept.text).toBe(res.text);

    const rows: Record<string, string>[] = parse(res.text, { columns: true });
    expect(rows).toHaveLength(s.timestamps.length);
    rows.forEach((row, t) => {
      expect(new Date(row.timestamp).getTime()).toBe(new Date(s.timestamps[t]).getTime());
      expect(row.timestamp).toMatch(/Z$/);
      expect(Number(row['site.supplyUsedKw'])).toBeCloseTo(s.supplyUsedKw[t], 9);
      expect(Number(row['grid.importKw'])).toBeCloseTo(s.grid.importKw[t], 9);
      expect(Number(row['grid.exportKw'])).toBeCloseTo(s.grid.exportKw[t], 9);
      expect(Number(row['ely-1.on'])).toBe(s.units['ely-1'].on[t]);
      expect(Number(row['ely-1.powerKw'])).toBeCloseTo(s.units['ely-1'].powerKw[t], 9);
      expect(Number(row['bess-1.socKwh'])).toBeCloseTo(s.storage['bess-1'].socKwh[t], 9);
    });
  });

  it('applies a named export profile: MW, the spec offset, a semicolon and the SCADA tag map', async () => {
    const profile = { name: 'plant-north', powerUnit: 'MW', timestamps: 'offset', delimiter: ';', tagMap: { 'ely-1.powerKw': 'PN.ELY1.P_SP', 'bess-1.socKwh': 'PN.BESS1.SOC' } };
    const created = await request(t.app).post('/v1/export-profiles').set(bearer(key)).send(profile);
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject(profile);
    expect((await request(t.app).post('/v1/export-profiles').set(bearer(key)).send(profile)).status).toBe(409);
    const other = await createTenantWithKey(t.ctx);
    expect((await request(t.app).get(`/v1/export-profiles/${created.body.id}`).set(bearer(other.apiKey))).status).toBe(404);

    const s = (await request(t.app).get(`/v1/runs/${runId}/schedule`).set(bearer(key)).expect(200)).body;
    const res = await request(t.app).get(`/v1/runs/${runId}/schedule?format=csv&profile=plant-north`).set(bearer(key)).expect(200);
    const rows: Record<string, string>[] = parse(res.text, { columns: true, delimiter: ';' });
    expect(Object.keys(rows[0])).toEqual(expect.arrayContaining(['timestamp', 'PN.ELY1.P_SP', 'PN.BESS1.SOC', 'grid.importMw', 'ely-1.on']));
    rows.forEach((row, t) => {
      expect(row.timestamp).toBe(s.timestamps[t]);
      expect(Number(row['PN.ELY1.P_SP'])).toBeCloseTo(s.units['ely-1'].powerKw[t] / 1000, 9);
      expect(Number(row['PN.BESS1.SOC'])).toBeCloseTo(s.storage['bess-1'].socKwh[t] / 1000, 9);
    });
    const overridden = await request(t.app).get(`/v1/runs/${runId}/schedule?format=csv&profile=plant-north&powerUnit=kW&delimiter=tab`).set(bearer(key)).expect(200);
    expect(overridden.text.split('\r\n')[0].split('\t')).toContain('grid.importKw');

    await request(t.app).patch(`/v1/export-profiles/${created.body.id}`).set(bearer(key)).send({ delimiter: 'tab' }).expect(200);
    const listed = await request(t.app).get('/v1/export-profiles').set(bearer(key)).expect(200);
    expect(listed.body.items).toEqual([expect.objectContaining({ name: 'plant-north', delimiter: 'tab' })]);
    await request(t.app).delete(`/v1/export-profiles/${created.body.id}`).set(bearer(key)).expect(204);
    expect((await request(t.app).get(`/v1/runs/${runId}/schedule?format=csv&profile=plant-north`).set(bearer(key))).status).toBe(404);
  });

  it('seeds the demo runs once, one at a time, and the worker solves every shared example', async () => {
    const ids = await seedDemoRuns(t.ctx, tenantId);
    expect(ids).toHaveLength(exampleSites.length);
    expect(await seedDemoRuns(t.ctx, tenantId)).toEqual(ids);
    for (const id of ids) {
      const run = await waitForRun(t.app, key, id, undefined, 60_000);
      expect(run.status, JSON.stringify(run.error)).toBe('succeeded');
    }
    // Each was submitted after the one before it ended, so the seeded runs held one concurrent place.
    const rows: { id: string; created: Date; finished: Date }[] = await t.ctx.db.query(
      'SELECT id, created_at AS created, finished_at AS finished FROM runs WHERE id = ANY($1) ORDER BY created_at',
      [ids],
    );
    expect(rows.map((r) => r.id)).toEqual(ids);
    for (let i = 1; i < rows.length; i++) expect(rows[i].created.getTime()).toBeGreaterThanOrEqual(rows[i - 1].finished.getTime());
    demoRunIds = ids;
  }, 300_000);

  it('exports every v1.1 demo schedule as CSV equal to its JSON schedule, column by column', async () => {
    expect(demoRunIds).toHaveLength(exampleSites.length);
    for (const id of demoRunIds) {
      const s = (await request(t.app).get(`/v1/runs/${id}/schedule`).set(bearer(key)).expect(200)).body;
      const res = await request(t.app).get(`/v1/runs/${id}/schedule?format=csv`).set(bearer(key)).expect(200);
      // The columns the README documents, each beside the JSON series it must equal (null: an empty field).
      const expected: [string, (number | null)[]][] = [
        ['site.supplyUsedKw', s.supplyUsedKw],
        ['site.curtailedKw', s.curtailedKw],
        ['site.unservedKw', s.unservedKw],
        ['grid.importKw', s.grid.importKw],
        ['grid.exportKw', s.grid.exportKw],
        ['site.marginalValuePerKwh', s.marginalValues.energyPerKwh],
      ];
      if (s.reserve) {
        expected.push(['site.reserveRequiredKw', s.reserve.requiredKw], ['site.reserveHeldKw', s.reserve.providedKw], ['site.reserveShortfallKw', s.reserve.shortfallKw]);
      }
      for (const [unit, u] of Object.entries<any>(s.units)) {
        expected.push([`${unit}.on`, u.on], [`${unit}.powerKw`, u.powerKw]);
        if (u.reserveKw) expected.push([`${unit}.reserveKw`, u.reserveKw]);
      }
      for (const [battery, b] of Object.entries<any>(s.storage)) {
        expected.push([`${battery}.chargeKw`, b.chargeKw], [`${battery}.dischargeKw`, b.dischargeKw], [`${battery}.socKwh`, b.socKwh]);
        if (b.reserveKw) expected.push([`${battery}.reserveKw`, b.reserveKw]);
      }
      for (const [store, st] of Object.entries<any>(s.stores)) {
        expected.push([`${store}.level`, st.level], [`${store}.shortfall`, st.shortfall], [`${store}.spill`, st.spill], [`${store}.marginalValue`, s.marginalValues.stores[store]]);
      }

      const rows: Record<string, string>[] = parse(res.text, { columns: true });
      expect(rows).toHaveLength(s.timestamps.length);
      expect(Object.keys(rows[0]).sort()).toEqual(['timestamp', ...expected.map(([name]) => name)].sort());
      rows.forEach((row, step) => {
        expect(new Date(row.timestamp).getTime()).toBe(new Date(s.timestamps[step]).getTime());
        for (const [name, series] of expected) {
          const value = series[step];
          if (value === null) expect(row[name], `${name} at step ${step}`).toBe('');
          else expect(Number(row[name]), `${name} at step ${step}`).toBeCloseTo(value, 8);
        }
      });
    }
  });

  it('ends an infeasible spec failed, with the outcome and the diagnosis kept', async () => {
    // An island with a hard 100 kW load and no supply, unit or storage cannot balance at any step.
    const spec = { horizon: { start: '2027-03-01T00:00:00Z', stepMinutes: 60, steps: 3 }, supply: { availableKw: [0, 0, 0] }, siteLoad: { kw: [100, 100, 100] } };
    const res = await request(t.app).post('/v1/runs').set(bearer(key)).send(spec).expect(202);
    const done = await waitForRun(t.app, key, res.body.id);
    expect(done).toMatchObject({ status: 'failed', outcome: 'infeasible', error: { code: 'infeasible' } });
    expect(done.warnings.length).toBeGreaterThan(0);
    expect((await request(t.app).get(`/v1/runs/${res.body.id}/schedule`).set(bearer(key))).status).toBe(409);
  });
});
