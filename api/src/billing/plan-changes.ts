// An owner changes the plan of a running subscription. An upgrade takes effect at once and the rest of
// the period is charged now (the card is tried first; a decline changes nothing). A downgrade is billed
// from the next period, and the tenant keeps the plan it paid for until then. Choosing the free plan
// cancels the subscription at the end of the period. Without billing, plans are set by operators.
import type { EntityManager } from 'typeorm';
import type Stripe from 'stripe';
import type { AppContext } from '../context';
import type { BillingAccount } from '../db/entities/billing-account';
import { Plan } from '../db/entities/plan';
import { Tenant } from '../db/entities/tenant';
import { HttpProblem } from '../lib/problem';
import type { Role } from '../lib/roles-and-scopes';
import { recordAudit, type AuditActor } from '../services/audit';
import { getPlanOrFail, updateTenant } from '../services/tenants';
import { findBillingAccount, lockBillingAccount } from './accounts';
import { freePlanId, loadCatalogue, priceForPlan, type Catalogue } from './catalogue';
import { isPaying } from './entitlement';
import { noSubscription, planGranted } from './problems';
import { atProvider, billingEnabled, paymentProvider } from './provider';
import { readSubscription } from './provider-subscriptions';
import { applyProviderView, settleOutcome, type SyncOutcome } from './subscription-sync';

const plansSetByOperators = () =>
  new HttpProblem({
    status: 409,
    slug: 'plans-set-by-operators',
    title: 'Plans are set by operators',
    detail: 'Billing is off on this Gridwright, so an owner cannot change the plan; ask an operator.',
  });

const usePlanGrant = () =>
  new HttpProblem({
    status: 409,
    slug: 'use-plan-grant',
    title: 'Operators grant plans',
    detail: "With billing on, a tenant's plan follows its subscription; an operator gives a plan without payment with PUT /v1/admin/tenants/{id}/plan-grant.",
  });

const checkoutRequired = (planId: string) =>
  new HttpProblem({
    status: 409,
    slug: 'checkout-required',
    title: 'The plan has to be bought first',
    detail: `The tenant has no subscription; start one for ${planId} with POST /v1/billing/checkout.`,
  });

const paymentOverdue = () =>
  new HttpProblem({
    status: 409,
    slug: 'payment-overdue',
    title: 'A payment is overdue',
    detail: 'The last renewal is unpaid; pay the open invoice from the billing page before changing the plan.',
  });

interface Change {
  m: EntityManager;
  account: BillingAccount;
  subscription: Stripe.Subscription;
  catalogue: Catalogue;
}

async function updateSubscription(ctx: AppContext, c: Change, params: Stripe.SubscriptionUpdateParams): Promise<Stripe.Subscription> {
  c.subscription = await atProvider(() => paymentProvider(ctx).subscriptions.update(c.subscription.id, params));
  return c.subscription;
}

function planItemOf(c: Change): string {
  const item = readSubscription(c.subscription, c.catalogue).planItemId;
  if (!item) throw new Error(`subscription ${c.subscription.id} carries none of the plans' prices`);
  return item;
}

/** Puts the price of the plan already paid for back, undoing a downgrade scheduled for the period's end. */
async function undoScheduledDowngrade(ctx: AppContext, c: Change) {
  if (!c.account.heldPlanId) return;
  const held = priceForPlan(c.catalogue, c.account.heldPlanId);
  await updateSubscription(ctx, c, { items: [{ id: planItemOf(c), price: held.priceId }], proration_behavior: 'none' });
  c.account.heldPlanId = null;
  c.account.heldUntil = null;
}

export async function changePlan(ctx: AppContext, input: { tenantId: string; planId: string; role: Role }, actor: AuditActor): Promise<void> {
  if (!billingEnabled(ctx)) {
    if (input.role !== 'operator') throw plansSetByOperators();
    await updateTenant(ctx, input.tenantId, { planId: input.planId }, actor);
    return;
  }
  if (input.role === 'operator') throw usePlanGrant();
  const catalogue = await loadCatalogue(ctx);
  const outcome = await ctx.db.transaction(async (m): Promise<SyncOutcome | null> => {
    const account = await lockBillingAccount(m, input.tenantId);
    const target = await getPlanOrFail(m, input.planId);
    if (account.grantedPlanId) throw planGranted(account.grantedPlanId);
    const tenant = await m.findOneByOrFail(Tenant, { id: input.tenantId });
    const free = await freePlanId(m);
    const paying = isPaying(account.subscriptionStatus);
    if (!paying) {
      if (target.id !== free) {
        priceForPlan(catalogue, target.id);
        throw checkoutRequired(target.id);
      }
      // Leaving a plan nobody pays for (an operator's earlier choice) for the free one costs nothing.
      if (tenant.planId !== free) {
        await recordAudit(m, { tenantId: tenant.id, action: 'plan-changed', actor, target: tenant.slug, details: { from: tenant.planId, to: free, source: 'owner' } });
        await m.update(Tenant, { id: tenant.id }, { planId: free });
      }
      return null;
    }
    const current = account.heldPlanId ?? account.subscriptionPlanId!;
    const c: Change = {
      m,
      account,
      catalogue,
      subscription: await atProvider(() => paymentProvider(ctx).subscriptions.retrieve(account.subscriptionId!)),
    };
    let effective: 'now' | 'period-end';
    if (target.id === free) {
      await undoScheduledDowngrade(ctx, c);
      await updateSubscription(ctx, c, { cancel_at_period_end: true });
      effective = 'period-end';
    } else {
      if (account.subscriptionStatus === 'past_due') throw paymentOverdue();
      const price = priceForPlan(catalogue, target.id);
      const plans = new Map((await m.find(Plan)).map((p) => [p.id, p]));
      const rank = (id: string) => plans.get(id)?.sortOrder ?? 0;
      if (target.id === current) {
        await undoScheduledDowngrade(ctx, c);
        effective = 'now';
      } else if (rank(target.id) > rank(current)) {
        await undoScheduledDowngrade(ctx, c);
        await updateSubscription(ctx, c, {
          items: [{ id: planItemOf(c), price: price.priceId }],
          proration_behavior: 'always_invoice',
          payment_behavior: 'error_if_incomplete',
        });
        effective = 'now';
      } else {
        if (account.subscriptionPlanId !== target.id) {
          await updateSubscription(ctx, c, { items: [{ id: planItemOf(c), price: price.priceId }], proration_behavior: 'none' });
        }
        if (!account.heldPlanId) {
          account.heldPlanId = current;
          account.heldUntil = account.currentPeriodEnd;
        }
        effective = 'period-end';
      }
      if (c.subscription.cancel_at_period_end) await updateSubscription(ctx, c, { cancel_at_period_end: false });
    }
    await recordAudit(m, { tenantId: tenant.id, action: 'plan-change-requested', actor, target: tenant.slug, details: { from: current, to: target.id, effective } });
    return applyProviderView(ctx, m, account, [readSubscription(c.subscription, catalogue)], 'owner');
  });
  await settleOutcome(ctx, outcome);
}

/** Cancels the subscription at the end of its period (the tenant then falls back to the free plan). */
export async function cancelAtPeriodEnd(ctx: AppContext, tenantId: string, actor: AuditActor): Promise<void> {
  paymentProvider(ctx);
  const account = await findBillingAccount(ctx.db.manager, tenantId);
  if (!account || !isPaying(account.subscriptionStatus)) throw noSubscription();
  await changePlan(ctx, { tenantId, planId: await freePlanId(ctx.db.manager), role: 'owner' }, actor);
}

/** Takes back a cancellation at the period's end. */
export async function resumeSubscription(ctx: AppContext, tenantId: string, actor: AuditActor): Promise<void> {
  paymentProvider(ctx);
  const catalogue = await loadCatalogue(ctx);
  const outcome = await ctx.db.transaction(async (m) => {
    const account = await lockBillingAccount(m, tenantId);
    if (!isPaying(account.subscriptionStatus)) throw noSubscription();
    if (!account.cancelAtPeriodEnd) return null;
    const subscription = await atProvider(() => paymentProvider(ctx).subscriptions.update(account.subscriptionId!, { cancel_at_period_end: false }));
    const tenant = await m.findOneByOrFail(Tenant, { id: tenantId });
    await recordAudit(m, { tenantId, action: 'subscription-resumed', actor, target: tenant.slug, details: { planId: account.subscriptionPlanId } });
    return applyProviderView(ctx, m, account, [readSubscription(subscription, catalogue)], 'owner');
  });
  await settleOutcome(ctx, outcome);
}
