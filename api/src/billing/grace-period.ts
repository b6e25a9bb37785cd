// After a failed renewal the tenant keeps its plan for BILLING_GRACE_DAYS (the grace starts when
// Gridwright first sees the subscription past due). When the grace is over and the invoice is still
// unpaid, the subscription is cancelled at the provider and the tenant falls back to the free plan:
// limits change, nothing is deleted.
import type { AppContext } from '../context';
import { lockBillingAccount } from './accounts';
import { atProvider, billingEnabled, paymentProvider } from './provider';
import { settleOutcome, syncLockedAccount } from './subscription-sync';

/** Ends every grace period over at `at`; returns the tenants that fell back. Safe to run in several workers at once. */
export async function endExpiredGracePeriods(ctx: AppContext, at: Date = new Date()): Promise<string[]> {
  if (!billingEnabled(ctx)) return [];
  const due: { tenant_id: string }[] = await ctx.db.query(`SELECT tenant_id FROM billing_accounts WHERE grace_ends_at <= $1 ORDER BY grace_ends_at`, [at]);
  const ended: string[] = [];
  for (const { tenant_id: tenantId } of due) {
    const outcome = await ctx.db.transaction(async (m) => {
      const account = await lockBillingAccount(m, tenantId);
      // Paid (or already ended) since the list was read.
      if (!account.graceEndsAt || account.graceEndsAt > at || !account.subscriptionId) return null;
      const subscriptionId = account.subscriptionId;
      const current = await atProvider(() => paymentProvider(ctx).subscriptions.retrieve(subscriptionId));
      if (current.status === 'past_due' || current.status === 'unpaid') {
        await atProvider(() => paymentProvider(ctx).subscriptions.cancel(subscriptionId, {}, { idempotencyKey: `gridwright-grace-end-${subscriptionId}` }));
      }
      return syncLockedAccount(ctx, m, account, 'grace-ended');
    });
    if (outcome?.notices.includes('lapsed-after-grace')) ended.push(tenantId);
    await settleOutcome(ctx, outcome);
  }
  return ended;
}
