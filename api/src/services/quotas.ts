// Plan limits and monthly quotas. Monthly runs are counted from the `runs` table (every run
// submitted in the period, whatever its outcome); solver-seconds from `run_usage`, which each run
// writes once when it ends.
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { solverOverageBilled } from '../billing/overage';
import { reportSolverOverage } from '../billing/metered-usage';
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

/** The plan's caps on one run's size; a spec above one is refused with 422 naming its field. */
const RUN_SIZE_CAPS = {
  steps: { limit: 'maxSteps', slug: 'plan-max-steps', title: 'Horizon longer than the plan allows', pointer: '/horizon/steps' },
  units: { limit: 'maxUnits', slug: 'plan-max-units', title: 'More units than the plan allows', pointer: '/units' },
} as const;

/** The monthly quotas: the plan limit each is held to, its name in messages and how an amount is written. */
const MONTHLY_QUOTAS = {
  runs: { limit: 'monthlyRuns', label: 'runs', slug: 'quota-monthly-runs', title: 'Monthly run quota used up', amount: (n: number) => String(n) },
  solverSeconds: {
    limit: 'monthlySolverSeconds',
    label: 'solver-seconds',
    slug: 'quota-monthly-solver-seconds',
    title: 'Monthly solver-seconds quota used up',
    amount: (n: number) => n.toFixed(1),
  },
} as const;

function assertRunSizeAllowed(limits: TenantLimits, size: { steps: number; units: number }) {
  for (const measure of ['steps', 'units'] as const) {
    const cap = RUN_SIZE_CAPS[measure];
    const limit = limits[cap.limit];
    const requested = size[measure];
    if (requested <= limit) continue;
    throw new HttpProblem({
      status: 422,
      slug: cap.slug,
      title: cap.title,
      detail: `The spec has ${requested} ${measure}; the plan allows at most ${limit} per run.`,
      errors: [{ pointer: cap.pointer, message: `at most ${limit} ${measure} on this plan` }],
      extensions: { limit, requested },
    });
  }
}

function assertQuotaLeft(metric: keyof PeriodTotals, limits: TenantLimits, used: PeriodTotals, period: BillingPeriod) {
  const quota = MONTHLY_QUOTAS[metric];
  const limit = limits[quota.limit];
  if (used[metric] < limit) return;
  throw new HttpProblem({
    status: 429,
    slug: quota.slug,
    title: quota.title,
    detail: `${quota.amount(used[metric])} of ${limit} ${quota.label} used in ${period.key}; the quota renews on ${period.end.toISOString().slice(0, 10)}.`,
    extensions: { limit, used: used[metric], period: period.key, renewsAt: period.end.toISOString() },
    headers: { 'Retry-After': secondsUntil(period.end) },
  });
}

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
  assertRunSizeAllowed(limits, size);
  await manager.query('SELECT pg_advisory_xact_lock(hashtextextended($1, 0))', [`quota:${tenantId}`]);
  const period = billingPeriod();
  const used = await periodTotals(manager, tenantId, period);
  assertQuotaLeft('runs', limits, used, period);
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
  // A paying subscriber's solver-seconds above the allowance are billed as metered usage, not refused.
  if (!(await solverOverageBilled(ctx.config, manager, tenantId))) assertQuotaLeft('solverSeconds', limits, used, period);
}

/**
 * Call inside the transaction that creates a webhook endpoint. A per-tenant transaction lock keeps
 * two creations racing for the last endpoint of the plan from both passing.
 */
export async function assertWebhookEndpointAllowed(ctx: AppContext, manager: EntityManager, tenantId: string): Promise<void> {
  const limits = await getTenantLimits(ctx, tenantId, manager);
  await manager.query('SELECT pg_advisory_xact_lock(hashtextextended($1, 0))', [`webhook-endpoints:${tenantId}`]);
  const [{ n }]: { n: number }[] = await manager.query('SELECT count(*)::int AS n FROM webhook_endpoints WHERE tenant_id = $1', [tenantId]);
  const limit = limits.webhookEndpoints;
  if (n < limit) return;
  throw new HttpProblem({
    status: 422,
    slug: 'plan-webhook-endpoints',
    title: 'More webhook endpoints than the plan allows',
    detail: `The tenant has ${n} webhook endpoints; the plan allows ${limit}. Delete one, or ask for a plan or limit that allows more.`,
    extensions: { limit, count: n },
  });
}

const THRESHOLDS = [80, 100] as const;

/**
 * Records what a finished run used (idempotent per run), warns the owners at 80 % and 100 %, once per
 * period each, and reports solver-seconds above the allowance of a paying subscriber as metered usage.
 */
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
  const period = billingPeriod(usage.endedAt);
  const used = await periodTotals(ctx.db.manager, usage.tenantId, period);
  const limits = await getTenantLimits(ctx, usage.tenantId);
  await reportSolverOverage(ctx, { tenantId: usage.tenantId, period, usedSolverSeconds: used.solverSeconds, allowanceSolverSeconds: limits.monthlySolverSeconds });
}

export async function sendQuotaWarnings(ctx: AppContext, tenantId: string, at: Date = new Date()): Promise<void> {
  const tenant = await getTenantOr404(ctx.db.manager, tenantId);
  const limits = await getTenantLimits(ctx, tenantId);
  const period = billingPeriod(at);
  const used = await periodTotals(ctx.db.manager, tenantId, period);
  const overageBilled = await solverOverageBilled(ctx.config, ctx.db.manager, tenantId);
  for (const metric of ['runs', 'solverSeconds'] as const) {
    const quota = MONTHLY_QUOTAS[metric];
    const limit = limits[quota.limit];
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
    const heading = threshold >= 100 ? `${tenant.name} has used its monthly ${quota.label} quota` : `${tenant.name} has used ${threshold} % of its monthly ${quota.label} quota`;
    const mail = composeMail(ctx, {
      tenantName: tenant.name,
      heading,
      paragraphs: [
        `${quota.amount(used[metric])} of ${limit} ${quota.label} used in ${period.key}.`,
        metric === 'solverSeconds' && overageBilled
          ? 'Solver-seconds above the allowance are billed as usage on the next invoice; the billing page shows it.'
          : threshold >= 100
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
