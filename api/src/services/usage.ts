import type { AppContext } from '../context';
import { billingPeriod } from './billing-period';
import { getTenantLimits, periodTotals } from './quotas';
import { getTenantOr404 } from './tenants';

const share = (used: number, limit: number) => (limit > 0 ? Math.round((used / limit) * 1e6) / 1e6 : used > 0 ? 1 : 0);

/** The current period per day against the quota. */
export async function usageReport(ctx: AppContext, tenantId: string, at: Date = new Date()) {
  const tenant = await getTenantOr404(ctx.db.manager, tenantId);
  const limits = await getTenantLimits(ctx, tenantId);
  const period = billingPeriod(at);
  const totals = await periodTotals(ctx.db.manager, tenantId, period);
  const rows: { date: string; runs: number; solverSeconds: number }[] = await ctx.db.query(
    `WITH days AS (
       SELECT d::date AS date FROM generate_series($2::timestamptz AT TIME ZONE 'UTC', ($3::timestamptz AT TIME ZONE 'UTC') - interval '1 day', interval '1 day') AS d
     ),
     submitted AS (
       SELECT (created_at AT TIME ZONE 'UTC')::date AS date, count(*)::int AS runs FROM runs
       WHERE tenant_id = $1 AND created_at >= $2 AND created_at < $3 GROUP BY 1
     ),
     solved AS (
       SELECT (ended_at AT TIME ZONE 'UTC')::date AS date, sum(solver_seconds)::float8 AS seconds FROM run_usage
       WHERE tenant_id = $1 AND ended_at >= $2 AND ended_at < $3 GROUP BY 1
     )
     SELECT to_char(days.date, 'YYYY-MM-DD') AS date, coalesce(submitted.runs, 0) AS runs, coalesce(solved.seconds, 0) AS "solverSeconds"
     FROM days LEFT JOIN submitted USING (date) LEFT JOIN solved USING (date) ORDER BY days.date`,
    [tenantId, period.start, period.end],
  );
  return {
    tenantId,
    period: { key: period.key, start: period.start.toISOString(), end: period.end.toISOString() },
    planId: tenant.planId,
    limits,
    quota: {
      runs: { used: totals.runs, limit: limits.monthlyRuns, share: share(totals.runs, limits.monthlyRuns) },
      solverSeconds: { used: totals.solverSeconds, limit: limits.monthlySolverSeconds, share: share(totals.solverSeconds, limits.monthlySolverSeconds) },
    },
    days: rows,
  };
}
