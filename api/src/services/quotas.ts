// Plan limits and monthly quotas. Monthly runs are counted from the `runs` table (every run
// submitted in the period, whatever its outcome); solver-seconds from `run_usage`, which each run
// writes once when it ends.
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { Plan } from '../db/entities/plan';
import { RunUsage } from '../db/entities/run-usage';
import { HttpProblem } from '../lib/problem';
import { billingPeriod, type BillingPeriod } from './billing-period';
import { composeMail, sendMail, tenantOwnerEmails } from './mail';
import { effectiveLimits, getTenantOr404, type TenantLimits } from './tenants';

export async function getTenantLimits(ctx: AppContext, tenantId: string, manager: EntityManager = ctx.db.manager): Promise<TenantLimits> {
  const tenant = await getTenantOr404(manager, tenantId);
  const plan = await manager.findOneByOrFail(Plan, { id: tenant.planId });
  return effectiveLimits(plan, tenant.limitOverrides);
}

export interface PeriodTotals {
  runs: number;
  solverSeconds: number;
}

export async function periodTotals(manager: EntityManager, tenantId: string, period: BillingPeriod): Promise<PeriodTotals> {
  const [runs] = await manager.query('SELECT count(*)::int AS n FROM runs WHERE tenant_id = $1 AND created_at >= $2 AND created_at < $3', [
    tenantId,
    period.start,
    period.end,
  ]);
  const [usage] = await manager.query(
    'SELECT coalesce(sum(solver_seconds), 0)::float8 AS s FROM run_usage WHERE tenant_id = $1 AND ended_at >= $2 AND ended_at < $3',
    [tenantId, period.start, period.end],
  );
  return { runs: runs.n, solverSeconds: usage.s };
}

const secondsUntil = (d: Date) => String(Math.max(1, Math.ceil((d.getTime() - Date.now()) / 1000)));

/**
 * Call inside the transaction that inserts the run. Takes a per-tenant transaction lock so that two
 * submissions racing for the last run of the quota cannot both pass.
 */
export async function assertRunAllowed(
  ctx: AppContext,
  manager: EntityManager,
  tenantId: string,
  size: { steps: number; units: number },
): Promise<void> {
  const limits = await getTenantLimits(ctx, tenantId, manager);
  if (size.steps > limits.maxSteps) {
    throw new HttpProblem({
      status: 422,
      slug: 'plan-max-steps',
      title: 'Horizon longer than the plan allows',
      detail: `The spec has ${size.steps} steps; the plan allows at most ${limits.maxSteps} per run.`,
      errors: [{ pointer: '/horizon/steps', message: `at most ${limits.maxSteps} on this plan` }],
      extensions: { limit: limits.maxSteps, requested: size.steps },
    });
  }
  if (size.units > limits.maxUnits) {
    throw new HttpProblem({
      status: 422,
      slug: 'plan-max-units',
      title: 'More units than the plan allows',
      detail: `The spec has ${size.units} units; the plan allows at most ${limits.maxUnits} per run.`,
      errors: [{ pointer: '/units', message: `at most ${limits.maxUnits} units on this plan` }],
      extensions: { limit: limits.maxUnits, requested: size.units },
    });
  }
  await manager.query('SELECT pg_advisory_xact_lock(hashtextextended($1, 0))', [`quota:${tenantId}`]);
  const period = billingPeriod();
  const used = await periodTotals(manager, tenantId, period);
  if (used.runs >= limits.monthlyRuns) {
    throw new HttpProblem({
      status: 429,
      slug: 'quota-monthly-runs',
      title: 'Monthly run quota used up',
      detail: `${used.runs} of ${limits.monthlyRuns} runs used in ${period.key}; the quota renews on ${period.end.toISOString().slice(0, 10)}.`,
      extensions: { limit: limits.monthlyRuns, used: used.runs, period: period.key, renewsAt: period.end.toISOString() },
      headers: { 'Retry-After': secondsUntil(period.end) },
    });
  }
  // Under the same lock, so simultaneous submissions cannot both take the last slot.
  const [active] = await manager.query(
    "SELECT count(*)::int AS n FROM runs WHERE tenant_id = $1 AND status IN ('queued', 'running')",
    [tenantId],
  );
  if (active.n >= limits.concurrentRuns) {
    throw new HttpProblem({
      status: 429,
      slug: 'concurrent-runs',
      title: 'Too many runs in progress',
      detail: `${active.n} runs are queued or running; the plan allows ${limits.concurrentRuns} at once. Submit again when one has ended.`,
      extensions: { limit: limits.concurrentRuns, active: active.n },
      headers: { 'Retry-After': '5' },
    });
  }
  if (used.solverSeconds >= limits.monthlySolverSeconds) {
    throw new HttpProblem({
      status: 429,
      slug: 'quota-monthly-solver-seconds',
      title: 'Monthly solver-seconds quota used up',
      detail: `${used.solverSeconds.toFixed(1)} of ${limits.monthlySolverSeconds} solver-seconds used in ${period.key}; the quota renews on ${period.end.toISOString().slice(0, 10)}.`,
      extensions: { limit: limits.monthlySolverSeconds, used: used.solverSeconds, period: period.key, renewsAt: period.end.toISOString() },
      headers: { 'Retry-After': secondsUntil(period.end) },
    });
  }
}

const THRESHOLDS = [80, 100] as const;
const METRICS = {
  runs: { label: 'runs', limit: 'monthlyRuns' },
  solverSeconds: { label: 'solver-seconds', limit: 'monthlySolverSeconds' },
} as const;

/** Records what a finished run used (idempotent per run) and warns the owners at 80 % and 100 %, once per period each. */
export async function recordRunUsage(
  ctx: AppContext,
  usage: { tenantId: string; runId: string; solverSeconds: number; steps: number; units: number; endedAt: Date },
): Promise<void> {
  await ctx.db
    .createQueryBuilder()
    .insert()
    .into(RunUsage)
    .values({ ...usage, solverSeconds: Math.max(0, usage.solverSeconds) })
    .orIgnore()
    .execute();
  await sendQuotaWarnings(ctx, usage.tenantId, usage.endedAt);
}

export async function sendQuotaWarnings(ctx: AppContext, tenantId: string, at: Date = new Date()): Promise<void> {
  const tenant = await getTenantOr404(ctx.db.manager, tenantId);
  const limits = await getTenantLimits(ctx, tenantId);
  const period = billingPeriod(at);
  const used = await periodTotals(ctx.db.manager, tenantId, period);
  for (const [metric, meta] of Object.entries(METRICS) as [keyof PeriodTotals, (typeof METRICS)[keyof PeriodTotals]][]) {
    const limit = limits[meta.limit];
    const share = limit > 0 ? (used[metric] / limit) * 100 : 100;
    const crossed = THRESHOLDS.filter((t) => share >= t);
    const threshold = crossed[crossed.length - 1];
    if (threshold === undefined) continue;
    // The notice row is the "once per period" memory; lower thresholds crossed at the same time are marked too.
    const inserted: { threshold: number }[] = await ctx.db.query(
      `INSERT INTO quota_notices (tenant_id, period, metric, threshold)
       SELECT $1, $2, $3, t FROM unnest($4::int[]) AS t
       ON CONFLICT DO NOTHING RETURNING threshold`,
      [tenantId, period.key, metric, crossed],
    );
    if (!inserted.some((r) => r.threshold === threshold)) continue;
    const amount = metric === 'solverSeconds' ? used[metric].toFixed(1) : String(used[metric]);
    const heading = threshold >= 100 ? `${tenant.name} has used its monthly ${meta.label} quota` : `${tenant.name} has used ${threshold} % of its monthly ${meta.label} quota`;
    const mail = composeMail(ctx, {
      tenantName: tenant.name,
      heading,
      paragraphs: [
        `${amount} of ${limit} ${meta.label} used in ${period.key}.`,
        threshold >= 100
          ? `New runs are refused until the quota renews on ${period.end.toISOString().slice(0, 10)} or the plan changes.`
          : `At 100 % new runs are refused until the quota renews on ${period.end.toISOString().slice(0, 10)}.`,
      ],
      link: { label: 'Open usage in the console', path: '/usage' },
    });
    try {
      await sendMail(ctx, { to: await tenantOwnerEmails(ctx, tenantId), subject: heading, ...mail, tenantId, kind: 'quota-warning' });
    } catch (err) {
      // Forget the notice so the next finished run tries again.
      await ctx.db.query('DELETE FROM quota_notices WHERE tenant_id = $1 AND period = $2 AND metric = $3 AND threshold = ANY($4::int[])', [
        tenantId,
        period.key,
        metric,
        inserted.map((r) => r.threshold),
      ]);
      ctx.log.error({ err, tenantId }, 'quota warning e-mail failed');
    }
  }
}
