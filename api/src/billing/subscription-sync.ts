// Brings a tenant's plan in line with its subscription as the provider shows it now. Provider events,
// the owner's plan changes and the grace sweep all end here, each under the billing account's lock.
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import type { BillingAccount } from '../db/entities/billing-account';
import { Plan } from '../db/entities/plan';
import { Tenant } from '../db/entities/tenant';
import { recordAudit } from '../services/audit';
import { forgetCredentialChange } from '../services/credential-cache';
import { mailBillingNotices, type NoticeContext } from './billing-mail';
import { freePlanId, loadCatalogue } from './catalogue';
import { decidingSubscription, entitlement, type BillingNotice, type ProviderSubscription } from './entitlement';
import { customerSubscriptions } from './provider-subscriptions';

export interface SyncOutcome {
  notices: BillingNotice[];
  notice: NoticeContext;
}

/**
 * Applies the provider's view to a locked account: the account's fields, the tenant's plan (audited
 * when it changes) and what the owners should hear. `subscriptions` are the customer's, newest first.
 */
export async function applyProviderView(
  ctx: AppContext,
  m: EntityManager,
  account: BillingAccount,
  subscriptions: ProviderSubscription[],
  cause: string,
): Promise<SyncOutcome> {
  const tenant = await m.findOneByOrFail(Tenant, { id: account.tenantId });
  const free = await freePlanId(m);
  const next = entitlement({
    account,
    subscription: decidingSubscription(subscriptions, account.subscriptionId),
    currentPlanId: tenant.planId,
    freePlanId: free,
    now: new Date(),
    graceDays: ctx.config.billingGraceDays,
  });
  Object.assign(account, next.account);
  await m.save(account);
  if (next.planId !== tenant.planId) {
    await recordAudit(m, { tenantId: tenant.id, action: 'plan-changed', target: tenant.slug, details: { from: tenant.planId, to: next.planId, source: 'billing', cause } });
    await m.update(Tenant, { id: tenant.id }, { planId: next.planId });
  }
  const planNames = new Map((await m.find(Plan)).map((p) => [p.id, p.name]));
  return {
    notices: next.notices,
    notice: {
      tenantId: tenant.id,
      tenantName: tenant.name,
      planName: planNames.get(account.heldPlanId ?? account.subscriptionPlanId ?? next.planId) ?? next.planId,
      freePlanName: planNames.get(free) ?? free,
      graceEndsAt: account.graceEndsAt,
    },
  };
}

/** Reads the customer's subscriptions from the provider and applies them (inside the caller's transaction, account locked). */
export async function syncLockedAccount(ctx: AppContext, m: EntityManager, account: BillingAccount, cause: string): Promise<SyncOutcome | null> {
  if (!account.customerId) return null;
  const catalogue = await loadCatalogue(ctx);
  return applyProviderView(ctx, m, account, await customerSubscriptions(ctx, account.customerId, catalogue), cause);
}

/**
 * What follows a committed sync: this process drops its cached copy of the tenant (its plan may have
 * changed; other API processes drop theirs on the change notice), then the owners are told.
 */
export async function settleOutcome(ctx: AppContext, outcome: SyncOutcome | null): Promise<void> {
  if (!outcome) return;
  forgetCredentialChange(ctx, { table: 'tenants', id: outcome.notice.tenantId });
  await mailBillingNotices(ctx, outcome.notices, outcome.notice);
}
