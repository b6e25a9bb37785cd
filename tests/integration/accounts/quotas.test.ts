import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { OutboxMessage } from '../../../api/src/db/entities/outbox-message';
import { HttpProblem } from '../../../api/src/lib/problem';
import { assertRunAllowed, recordRunUsage } from '../../../api/src/services/quotas';
import { updateTenant } from '../../../api/src/services/tenants';
import { waitForMail } from '../../support/outbox';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

async function refusal(p: Promise<unknown>): Promise<HttpProblem> {
  try {
    await p;
  } catch (err) {
    if (err instanceof HttpProblem) return err;
    throw err;
  }
  throw new Error('expected a refusal');
}

describe('quotas and usage', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(async () => t.close());

  const insertRun = (tenantId: string) =>
    t.ctx.db.query(`INSERT INTO runs (tenant_id, spec, steps, units, time_limit_seconds) VALUES ($1, '{}', 24, 1, 5) RETURNING id`, [tenantId]);

  it("refuses runs above the plan's step and unit caps, naming the limit and the numbers", async () => {
    const { tenantId, apiKey } = await createTenantWithKey(t.ctx, { plan: 'pilot' });
    const steps = await refusal(t.ctx.db.transaction((m) => assertRunAllowed(t.ctx, m, tenantId, { steps: 700, units: 1 })));
    expect(steps.type).toBe('/problems/plan-max-steps');
    expect(steps.message).toContain('700');
    expect(steps.message).toContain('672');
    const units = await refusal(t.ctx.db.transaction((m) => assertRunAllowed(t.ctx, m, tenantId, { steps: 24, units: 6 })));
    expect(units.type).toBe('/problems/plan-max-units');
    expect(units.status).toBe(422);
    expect(units.message).toBe('The spec has 6 units; the plan allows at most 5 per run.');
    expect(units.errors).toEqual([{ pointer: '/units', message: 'at most 5 units on this plan' }]);
    expect(units.extensions).toEqual({ limit: 5, requested: 6 });
    expect(steps.errors).toEqual([{ pointer: '/horizon/steps', message: 'at most 672 steps on this plan' }]);

    // Through the runs route as well: the cap comes back as problem+json.
    const spec = { horizon: { start: '2027-03-01T00:00:00+01:00', stepMinutes: 15, steps: 700 }, supply: { availableKw: Array(700).fill(1) } };
    const res = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(spec);
    expect(res.status).toBe(422);
    expect(res.body).toMatchObject({ type: '/problems/plan-max-steps', limit: 672, requested: 700 });
  });

  it('refuses a run over the monthly run quota', async () => {
    const { tenantId } = await createTenantWithKey(t.ctx);
    await updateTenant(t.ctx, tenantId, { limitOverrides: { monthlyRuns: 2 } }, {});
    await t.ctx.db.transaction((m) => assertRunAllowed(t.ctx, m, tenantId, { steps: 24, units: 1 }));
    await insertRun(tenantId);
    await insertRun(tenantId);
    const p = await refusal(t.ctx.db.transaction((m) => assertRunAllowed(t.ctx, m, tenantId, { steps: 24, units: 1 })));
    expect(p.status).toBe(429);
    expect(p.type).toBe('/problems/quota-monthly-runs');
    expect(p.message).toMatch(/^2 of 2 runs used/);
    expect(Number(p.headers['Retry-After'])).toBeGreaterThan(0);
  });

  it("refuses a run above the plan's concurrent-runs cap while earlier runs are queued or running", async () => {
    const { tenantId } = await createTenantWithKey(t.ctx);
    await updateTenant(t.ctx, tenantId, { limitOverrides: { concurrentRuns: 2 } }, {});
    const [first] = await insertRun(tenantId);
    await insertRun(tenantId);
    const p = await refusal(t.ctx.db.transaction((m) => assertRunAllowed(t.ctx, m, tenantId, { steps: 24, units: 1 })));
    expect(p.status).toBe(429);
    expect(p.type).toBe('/problems/concurrent-runs');
    expect(p.message).toMatch(/^2 runs are queued or running; the plan allows 2 at once/);
    // Once one has ended, the slot is free again.
    await t.ctx.db.query(`UPDATE runs SET status = 'succeeded' WHERE id = $1`, [first.id]);
    await t.ctx.db.transaction((m) => assertRunAllowed(t.ctx, m, tenantId, { steps: 24, units: 1 }));
  });

  it('warns the owners at 80 % and 100 % of solver-seconds, once each per period, over real SMTP', async () => {
    const { tenantId, apiKey } = await createTenantWithKey(t.ctx, { slug: 'quota-watch' });
    const owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner', email: 'owner@quota-watch.example' });
    await createUserSession(t.ctx, t.app, { tenantId, role: 'developer', email: 'dev@quota-watch.example' });
    await updateTenant(t.ctx, tenantId, { limitOverrides: { monthlySolverSeconds: 100 } }, {});
    const usage = (seconds: number) => recordRunUsage(t.ctx, { tenantId, runId: randomUUID(), solverSeconds: seconds, steps: 24, units: 1, endedAt: new Date() });

    await usage(50);
    await usage(35);
    const [warning] = await waitForMail(t.ctx, { to: owner.email, kind: 'quota-warning' });
    expect(warning!.subject).toBe('quota-watch has used 80 % of its monthly solver-seconds quota');
    expect(warning!.textBody).toContain('85.0 of 100 solver-seconds');
    expect(warning!.textBody).toMatch(/Tenant: quota-watch/);
    expect(warning!.htmlBody).toContain('/usage');
    await usage(5);
    await t.ctx.db.transaction((m) => assertRunAllowed(t.ctx, m, tenantId, { steps: 24, units: 1 }));
    await usage(15);
    const all = await waitForMail(t.ctx, { to: owner.email, kind: 'quota-warning', count: 2 });
    expect(all.map((m) => m.subject)).toEqual([
      'quota-watch has used 80 % of its monthly solver-seconds quota',
      'quota-watch has used its monthly solver-seconds quota',
    ]);
    await usage(1);
    expect(await t.ctx.db.getRepository(OutboxMessage).countBy({ kind: 'quota-warning', tenantId })).toBe(2);
    expect(all[0]!.rcptTo).toEqual([owner.email]);

    const p = await refusal(t.ctx.db.transaction((m) => assertRunAllowed(t.ctx, m, tenantId, { steps: 24, units: 1 })));
    expect(p.type).toBe('/problems/quota-monthly-solver-seconds');
    expect(p.message).toMatch(/^106\.0 of 100 solver-seconds used/);

    await insertRun(tenantId);
    const report = await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${apiKey}`).expect(200);
    expect(report.body.quota.solverSeconds).toEqual({ used: 106, limit: 100, share: 1.06 });
    expect(report.body.quota.runs.used).toBe(1);
    const today = new Date().toISOString().slice(0, 10);
    expect(report.body.days.find((d: { date: string }) => d.date === today)).toEqual({ date: today, runs: 1, solverSeconds: 106 });
    expect(report.body.days[0].date).toBe(`${report.body.period.key}-01`);
  });

  it('records a run once even when the end is reported twice', async () => {
    const { tenantId } = await createTenantWithKey(t.ctx);
    const runId = randomUUID();
    for (let i = 0; i < 2; i++) await recordRunUsage(t.ctx, { tenantId, runId, solverSeconds: 3, steps: 24, units: 1, endedAt: new Date() });
    const [row] = await t.ctx.db.query('SELECT sum(solver_seconds)::float8 AS s FROM run_usage WHERE tenant_id = $1', [tenantId]);
    expect(row.s).toBe(3);
  });
});
