// Fairness across tenants: one tenant's backlog does not hold another tenant's run back. Checked
// by order, never by time: the rounds the queue gives (runs/queue.ts, derived by hand below) and
// the order in which one worker with one slot starts the runs.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startWorkers } from '../../../api/src/services/workers';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, smallSpec, waitForRun } from './run-helpers';

describe('runs of several tenants in one queue', () => {
  let t: TestApp;
  let workers: Awaited<ReturnType<typeof startWorkers>> | null = null;
  beforeAll(async () => {
    t = await startTestApp(FAST_QUEUE_ENV);
  });
  afterAll(async () => {
    await workers?.stop();
    await t.close();
  });

  const submit = async (key: string, name: string): Promise<string> => (await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name })).expect(202)).body.id;
  const roundOf = async (id: string): Promise<number> => (await t.ctx.db.query('SELECT queue_round FROM runs WHERE id = $1', [id]))[0].queue_round;

  it("starts tenant B's one run before all but one of tenant A's 50 queued runs", { timeout: 120_000 }, async () => {
    const a = await createTenantWithKey(t.ctx);
    const b = await createTenantWithKey(t.ctx);
    const c = await createTenantWithKey(t.ctx);
    const backlog: string[] = [];
    for (let i = 0; i < 50; i++) backlog.push(await submit(a.apiKey, `a-${i}`));
    const single = await submit(b.apiKey, 'b-0');
    const newcomer = await submit(c.apiKey, 'c-0');
    const more = await submit(a.apiKey, 'a-50');

    // By hand: nothing was queued before A's first run, so A's runs take rounds 0, 1, …, 49 (each one
    // after A's last queued). B and C had nothing queued: they join the lowest queued round, 0.
    // A's 51st run goes after A's 50th: round 50. Priority is minus the round, ties go by age.
    expect(await Promise.all(backlog.map(roundOf))).toEqual(backlog.map((_, i) => i));
    expect(await roundOf(single)).toBe(0);
    expect(await roundOf(newcomer)).toBe(0);
    expect(await roundOf(more)).toBe(50);

    // One worker, one slot: the start order is the queue's order.
    workers = await startWorkers(t.ctx, { concurrency: 1 });
    expect((await waitForRun(t.app, b.apiKey, single)).status).toBe('succeeded');
    expect((await waitForRun(t.app, c.apiKey, newcomer)).status).toBe('succeeded');
    const started: { id: string }[] = await t.ctx.db.query(
      `SELECT id FROM runs WHERE tenant_id = ANY($1::uuid[]) AND started_at IS NOT NULL ORDER BY started_at, id`,
      [[a.tenantId, b.tenantId, c.tenantId]],
    );
    expect(started.slice(0, 3).map((r) => r.id)).toEqual([backlog[0], single, newcomer]);
  });
});
