// Two API processes on one database, as when the API scales out: each keeps the views of the runs
// it served (api/src/runs/run-view-cache.ts). A run that moves in a worker must be shown moved by
// every process through the change notice alone: here a process keeps a queued or running run's view
// for a minute, so only the notice (or, where a test says so, a one-second time to live) can
// explain an answer catching up.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getRun, RUN_FOR_VIEW_SQL } from '../../../api/src/runs/reading';
import { runViewCacheFor } from '../../../api/src/runs/run-view-cache';
import { claimRun, finishRun, recordProgress } from '../../../api/src/runs/transitions';
import { runDetail } from '../../../api/src/runs/view';
import { eventually } from '../../support/eventually';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, handMadeResult, smallSpec } from './run-helpers';

const MINUTE = { ...FAST_QUEUE_ENV, RUN_CACHE_SECONDS: '60' };

const finishedResult = handMadeResult(7.25, 2);

describe('kept run views across API processes', () => {
  let a: TestApp;
  let b: TestApp;
  let key: string;
  let tenantId: string;
  beforeAll(async () => {
    a = await startTestApp(MINUTE);
    b = await startTestApp({ ...MINUTE, DATABASE_URL: a.databaseUrl });
    ({ apiKey: key, tenantId } = await createTenantWithKey(a.ctx));
  });
  afterAll(async () => {
    await b?.close();
    await a?.close();
  });

  const name = (app: TestApp) => (app === a ? 'A' : 'B');
  const submit = async (label: string): Promise<string> => (await request(a.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: label })).expect(202)).body.id;
  const rowView = async (app: TestApp, id: string) => JSON.parse(JSON.stringify(runDetail(await getRun(app.ctx, tenantId, id))));

  /** Reads the run from `app` until that process keeps its view, so a later answer cannot be a first read. */
  async function keptIn(app: TestApp, id: string): Promise<void> {
    await eventually(`the run in ${name(app)}'s kept views`, async () => {
      await request(app.app).get(`/v1/runs/${id}`).set(bearer(key)).expect(200);
      return runViewCacheFor(app.ctx).get(tenantId, id) ? true : undefined;
    });
  }

  /** Reads from `app` until its answer is the view of the row as it now is in the database. */
  const showsRow = (app: TestApp, id: string) =>
    eventually(`${name(app)} to show run ${id} as its row now is`, async () => {
      const res = await request(app.app).get(`/v1/runs/${id}`).set(bearer(key)).expect(200);
      const now = await rowView(app, id);
      return JSON.stringify(res.body) === JSON.stringify(now) ? res.body : undefined;
    });

  it("shows in B every move a worker makes, though B keeps a queued run's view for a minute", async () => {
    const id = await submit('moves');
    await keptIn(b, id);
    const [{ job_id: jobId }] = await a.ctx.db.query('SELECT job_id FROM runs WHERE id = $1', [id]);
    const claimed = (await claimRun(a.ctx.db, id, jobId, 'test-worker'))!;
    expect((await showsRow(b, id)).status).toBe('running');
    await keptIn(b, id);
    await recordProgress(a.ctx.db, claimed, { windowsDone: 2, windowsTotal: 4 });
    expect((await showsRow(b, id)).progress).toEqual({ windowsDone: 2, windowsTotal: 4, percent: 50 });
    await keptIn(b, id);
    await finishRun(a.ctx.db, claimed, finishedResult, { log: 'log\n', solverSeconds: 0.2, progress: { windowsDone: 4, windowsTotal: 4 } });
    expect(await showsRow(b, id)).toMatchObject({ status: 'succeeded', objective: { value: 7.25 }, progress: { percent: 100 } });
    // Final: kept without a time limit, and still the same answer.
    await keptIn(b, id);
    expect(runViewCacheFor(b.ctx).get(tenantId, id)!.final).toBe(true);
    expect((await request(b.app).get(`/v1/runs/${id}`).set(bearer(key)).expect(200)).body).toEqual(await rowView(b, id));
  });

  it('answers a cancel in A at once, and in B on the notice, however the id is spelt', async () => {
    const id = await submit('cancelled');
    const upper = id.toUpperCase();
    await keptIn(a, id);
    await keptIn(b, upper);
    await request(a.app).post(`/v1/runs/${upper}/cancel`).set(bearer(key)).expect(202);
    // A dropped its own copy before answering the cancel.
    expect((await request(a.app).get(`/v1/runs/${id}`).set(bearer(key)).expect(200)).body.status).toBe('cancelled');
    expect((await showsRow(b, upper)).status).toBe('cancelled');
  });

  it("forgets a deleted run, even a finished one, and never shows a kept view to another tenant", async () => {
    const id = await submit('deleted');
    const [{ job_id: jobId }] = await a.ctx.db.query('SELECT job_id FROM runs WHERE id = $1', [id]);
    const claimed = (await claimRun(a.ctx.db, id, jobId, 'test-worker'))!;
    await finishRun(a.ctx.db, claimed, finishedResult, { log: '', solverSeconds: 0.1, progress: { windowsDone: 1, windowsTotal: 1 } });
    await keptIn(b, id);
    const other = await createTenantWithKey(a.ctx);
    await request(b.app).get(`/v1/runs/${id}`).set(bearer(other.apiKey)).expect(404);
    await a.ctx.db.query('DELETE FROM runs WHERE id = $1', [id]);
    await eventually('B to answer 404 for the deleted run', async () => ((await request(b.app).get(`/v1/runs/${id}`).set(bearer(key))).status === 404 ? true : undefined));
  });

  it('drops the views of unfinished runs when its listening connection is cut, listens again, and still hears a move', async () => {
    const id = await submit('deaf');
    await keptIn(b, id);
    const listeners = () =>
      b.ctx.db.query(`SELECT pid FROM pg_stat_activity WHERE datname = current_database() AND query = 'LISTEN run_changes' AND pid <> pg_backend_pid()`) as Promise<{ pid: number }[]>;
    const before = (await listeners()).map((r) => r.pid);
    expect(before.length).toBeGreaterThanOrEqual(2);
    await b.ctx.db.query('SELECT pg_terminate_backend(pid) FROM unnest($1::int[]) AS pid', [before]);
    // Notices sent while it is deaf are lost, so it keeps nothing that could change unheard.
    await eventually("B to drop the queued run's view", async () => (runViewCacheFor(b.ctx).get(tenantId, id) ? undefined : true));
    await eventually('both apps to listen again', async () => {
      const now = (await listeners()).map((r) => r.pid);
      return now.length >= 2 && now.every((pid) => !before.includes(pid)) ? now : undefined;
    });
    await keptIn(b, id);
    const [{ job_id: jobId }] = await a.ctx.db.query('SELECT job_id FROM runs WHERE id = $1', [id]);
    await claimRun(a.ctx.db, id, jobId, 'test-worker');
    expect((await showsRow(b, id)).status).toBe('running');
  });
});

describe('a missed run change notice', () => {
  let t: TestApp;
  let key: string;
  let tenantId: string;
  beforeAll(async () => {
    t = await startTestApp({ ...FAST_QUEUE_ENV, RUN_CACHE_SECONDS: '1' });
    ({ apiKey: key, tenantId } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t?.close());

  it("is made good by the time to live: a queued run's view catches up once its entry expires", async () => {
    const id: string = (await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: 'unheard' })).expect(202)).body.id;
    await eventually('the run in the kept views', async () => {
      await request(t.app).get(`/v1/runs/${id}`).set(bearer(key)).expect(200);
      return runViewCacheFor(t.ctx).get(tenantId, id) ? true : undefined;
    });
    // Triggers do not fire for a session in replica mode: the change sends no notice.
    await t.ctx.db.transaction(async (m) => {
      await m.query(`SET LOCAL session_replication_role = replica`);
      await m.query(`UPDATE runs SET name = 'renamed unheard' WHERE id = $1`, [id]);
    });
    await eventually('the new name', async () => ((await request(t.app).get(`/v1/runs/${id}`).set(bearer(key))).body.name === 'renamed unheard' ? true : undefined));
  });
});

describe('GET /v1/runs/{id} as clients poll it', () => {
  let t: TestApp;
  let key: string;
  beforeAll(async () => {
    t = await startTestApp(FAST_QUEUE_ENV);
    ({ apiKey: key } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t?.close());

  it('answers a matching If-None-Match with 304, from a kept view as from a fresh read, with the ETag Express makes of the body', async () => {
    const id: string = (await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: 'etag' })).expect(202)).body.id;
    const etagOf = t.app.get('etag fn') as (body: string, encoding: string) => string;
    for (let read = 0; read < 3; read++) {
      const res = await request(t.app).get(`/v1/runs/${id}`).set(bearer(key)).expect(200);
      expect(res.headers.etag).toBe(etagOf(res.text, 'utf8'));
      const again = await request(t.app).get(`/v1/runs/${id}`).set(bearer(key)).set('If-None-Match', res.headers.etag);
      expect(again.status).toBe(304);
      expect(again.headers.ratelimit).toBeDefined();
    }
  });

  it('sends a change notice for every column the view reads', async () => {
    const selected = RUN_FOR_VIEW_SQL.replace(/^SELECT\s+|\s+FROM[\s\S]*$/g, '')
      .split(',')
      .map((item) => item.trim().split(/\s/)[0]!);
    expect(selected).toContain('status');
    const [{ def }] = await t.ctx.db.query(`SELECT pg_get_triggerdef(oid) AS def FROM pg_trigger WHERE tgname = 'runs_view_change'`);
    // The id never changes; a deleted run has a trigger of its own.
    for (const column of selected.filter((c) => c !== 'id')) {
      expect(def, column).toContain(`old.${column}`);
      expect(def, column).toContain(`new.${column}`);
    }
  });

  it('still has every other spelling checked against the contract', async () => {
    const id: string = (await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: 'contract' })).expect(202)).body.id;
    const unknownQuery = await request(t.app).get(`/v1/runs/${id}?verbose=1`).set(bearer(key));
    expect(unknownQuery.status).toBe(400);
    expect(unknownQuery.headers['content-type']).toMatch(/^application\/problem\+json/);
    const tooLong = await request(t.app).get(`/v1/runs/${'a'.repeat(101)}`).set(bearer(key));
    expect(tooLong.status).toBe(400);
    expect(JSON.stringify(tooLong.body)).toContain('/params/runId');
    const escapedTooLong = await request(t.app).get(`/v1/runs/${'%61'.repeat(101)}`).set(bearer(key));
    expect(escapedTooLong.status).toBe(400);
    // At the bound the contract lets it through, and an id that names no run of the tenant is 404.
    expect((await request(t.app).get(`/v1/runs/${'a'.repeat(100)}`).set(bearer(key))).status).toBe(404);
    expect((await request(t.app).get(`/v1/runs/${'%61'.repeat(100)}`).set(bearer(key))).status).toBe(404);
  });
});
