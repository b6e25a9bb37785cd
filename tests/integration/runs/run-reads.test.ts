// GET /v1/runs/{id} reads its row with a prepared statement and keeps the JSON of the run per
// process, a queued or running run's until its change notice arrives (run-view-cache.test.ts has
// two processes). Each state's answer must equal the view of the whole row read through the ORM,
// a run that is still moving must show every move, and a kept view must stay its tenant's.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getRun } from '../../../api/src/runs/reading';
import { claimRun, finishRun, recordProgress } from '../../../api/src/runs/transitions';
import { runDetail } from '../../../api/src/runs/view';
import { eventually } from '../../support/eventually';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, handMadeResult, smallSpec } from './run-helpers';

describe('reading a run', () => {
  let t: TestApp;
  let key: string;
  let tenantId: string;
  beforeAll(async () => {
    t = await startTestApp({ ...FAST_QUEUE_ENV, RUN_CACHE_SECONDS: '60' });
    ({ apiKey: key, tenantId } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t.close());

  /** The answer once it is the view of the row as the ORM reads it: a move made outside the app reaches it by its notice. */
  async function read(id: string) {
    return eventually(`run ${id} as its row now is`, async () => {
      const res = await request(t.app).get(`/v1/runs/${id}`).set(bearer(key)).expect(200);
      expect(res.headers['content-type']).toBe('application/json; charset=utf-8');
      return JSON.stringify(res.body) === JSON.stringify(runDetail(await getRun(t.ctx, tenantId, id))) ? res.body : undefined;
    });
  }

  it('shows every move of a running run, then the finished run with its result, the same on every read', async () => {
    const id: string = (await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: 'read back' })).expect(202)).body.id;
    expect((await read(id)).status).toBe('queued');
    const [{ job_id: jobId }] = await t.ctx.db.query('SELECT job_id FROM runs WHERE id = $1', [id]);
    const claimed = (await claimRun(t.ctx.db, id, jobId, 'test-worker'))!;
    expect((await read(id)).status).toBe('running');
    await recordProgress(t.ctx.db, claimed, { windowsDone: 1, windowsTotal: 4 });
    expect((await read(id)).progress).toEqual({ windowsDone: 1, windowsTotal: 4, percent: 25 });

    await finishRun(t.ctx.db, claimed, handMadeResult(12.5, 3), { log: 'log\n', solverSeconds: 0.5, progress: { windowsDone: 4, windowsTotal: 4 } });
    const first = await read(id);
    expect(first).toMatchObject({ status: 'succeeded', outcome: 'optimal', objective: { value: 12.5 }, model: { binaries: 3 }, progress: { percent: 100 } });
    expect(await read(id)).toEqual(first);

    const other = await createTenantWithKey(t.ctx);
    await request(t.app).get(`/v1/runs/${id}`).set(bearer(other.apiKey)).expect(404);
  });
});
