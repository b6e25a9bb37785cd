// Solver-seconds above the plan's monthly allowance (the quota's calendar month in UTC), reported to
// the provider as usage of the metered price. Each report is first written as a row, in whole
// seconds, under a per-tenant lock, so reports never overlap; the row's id is the meter event's
// identifier and the request's idempotency key, so sending it again (after a failure, from any
// worker) is counted once. The provider stamps the usage when it receives it and bills it on the
// invoice of the period that time falls in.
import type { AppContext } from '../context';
import type { BillingPeriod } from '../services/billing-period';
import { SOLVER_SECONDS_METER_EVENT } from './catalogue';
import { solverOverageBilled } from './overage';
import { billingEnabled, paymentProvider } from './provider';

export interface PeriodUsage {
  tenantId: string;
  period: BillingPeriod;
  usedSolverSeconds: number;
  allowanceSolverSeconds: number;
}

/** Writes a report of the overage not yet reported for the period, then sends what is unsent. */
export async function reportSolverOverage(ctx: AppContext, usage: PeriodUsage): Promise<void> {
  if (!billingEnabled(ctx)) return;
  await ctx.db.transaction(async (m) => {
    if (!(await solverOverageBilled(ctx.config, m, usage.tenantId))) return;
    await m.query('SELECT pg_advisory_xact_lock(hashtextextended($1, 0))', [`billing-usage:${usage.tenantId}`]);
    const overage = Math.floor(Math.max(0, usage.usedSolverSeconds - usage.allowanceSolverSeconds));
    const [{ reported }] = await m.query(`SELECT coalesce(sum(solver_seconds), 0)::int AS reported FROM billing_usage_reports WHERE tenant_id = $1 AND period = $2`, [
      usage.tenantId,
      usage.period.key,
    ]);
    if (overage <= reported) return;
    await m.query(
      `INSERT INTO billing_usage_reports (tenant_id, customer_id, period, solver_seconds)
       SELECT tenant_id, customer_id, $2, $3 FROM billing_accounts WHERE tenant_id = $1 AND customer_id IS NOT NULL`,
      [usage.tenantId, usage.period.key, overage - reported],
    );
  });
  await sendUsageReports(ctx, usage.tenantId);
}

/** Sends unsent usage reports (one tenant's, or all), oldest first; a report the provider refuses stays for the next try. */
export async function sendUsageReports(ctx: AppContext, tenantId?: string): Promise<number> {
  if (!billingEnabled(ctx)) return 0;
  const rows: { id: string; customer_id: string; solver_seconds: number }[] = await ctx.db.query(
    `SELECT id, customer_id, solver_seconds FROM billing_usage_reports WHERE reported_at IS NULL AND ($1::uuid IS NULL OR tenant_id = $1) ORDER BY created_at LIMIT 500`,
    [tenantId ?? null],
  );
  let sent = 0;
  for (const row of rows) {
    try {
      await paymentProvider(ctx).billing.meterEvents.create(
        {
          event_name: SOLVER_SECONDS_METER_EVENT,
          identifier: row.id,
          payload: { stripe_customer_id: row.customer_id, value: String(row.solver_seconds) },
        },
        { idempotencyKey: `gridwright-usage-${row.id}` },
      );
      await ctx.db.query(`UPDATE billing_usage_reports SET reported_at = now() WHERE id = $1`, [row.id]);
      sent++;
    } catch (err) {
      ctx.log.warn({ err, reportId: row.id }, 'reporting metered usage failed; it is sent again later');
    }
  }
  return sent;
}
