// What the billing page and the operators' view show: the tenant's standing (from Gridwright's own
// record) with, for owners, what only the provider knows — prices, the card on file (brand, last
// digits, expiry), invoices and the next invoice. Nothing about cards is stored here; it is read.
import Stripe from 'stripe';
import type { AppContext } from '../context';
import type { BillingAccount } from '../db/entities/billing-account';
import { validationProblem } from '../lib/problem';
import { getTenantOr404 } from '../services/tenants';
import { findBillingAccount } from './accounts';
import { freePlanId, loadCatalogue } from './catalogue';
import { isPaying } from './entitlement';
import { noSubscription } from './problems';
import { atProvider, billingEnabled, paymentProvider, providerProblem } from './provider';

const iso = (d: Date | null) => d?.toISOString() ?? null;
const fromUnix = (s: number | null | undefined) => (s ? new Date(s * 1000).toISOString() : null);

export type PlanSource = 'subscription' | 'grant' | 'free' | 'assigned';

/** Where the tenant's plan comes from: a subscription, an operator's grant, the free plan, or a plan assigned without payment. */
function planSource(account: BillingAccount | null, planId: string, free: string): PlanSource {
  if (account?.grantedPlanId) return 'grant';
  if (account && isPaying(account.subscriptionStatus)) return 'subscription';
  return planId === free ? 'free' : 'assigned';
}

/** The standing Gridwright records, without asking the provider (the operators' view and the base of the owners'). */
export async function billingStanding(ctx: AppContext, tenantId: string) {
  const tenant = await getTenantOr404(ctx.db.manager, tenantId);
  const account = await findBillingAccount(ctx.db.manager, tenant.id);
  const free = await freePlanId(ctx.db.manager);
  const paying = account !== null && isPaying(account.subscriptionStatus);
  return {
    enabled: billingEnabled(ctx),
    planId: tenant.planId,
    planSource: planSource(account, tenant.planId, free),
    freePlanId: free,
    customerId: account?.customerId ?? null,
    subscription: paying
      ? {
          id: account.subscriptionId!,
          status: account.subscriptionStatus!,
          planId: account.subscriptionPlanId!,
          currentPeriodStart: iso(account.currentPeriodStart),
          currentPeriodEnd: iso(account.currentPeriodEnd),
          cancelAtPeriodEnd: account.cancelAtPeriodEnd,
          // What the plan becomes at the period's end, when that differs from today's.
          scheduledPlanId: account.cancelAtPeriodEnd ? free : account.heldPlanId ? account.subscriptionPlanId : null,
          scheduledAt: account.cancelAtPeriodEnd || account.heldPlanId ? iso(account.heldUntil ?? account.currentPeriodEnd) : null,
        }
      : null,
    graceEndsAt: iso(account?.graceEndsAt ?? null),
    grant: account?.grantedPlanId ? { planId: account.grantedPlanId, reason: account.grantReason ?? '', grantedAt: iso(account.grantedAt)!, grantedBy: account.grantedBy } : null,
  };
}

function paymentMethodView(method: Stripe.PaymentMethod | string | null | undefined) {
  if (!method || typeof method === 'string' || !method.card) return null;
  return { brand: method.card.brand, last4: method.card.last4, expMonth: method.card.exp_month, expYear: method.card.exp_year };
}

/** The owners' billing page: the standing, the prices on offer and the card on file. */
export async function billingOverview(ctx: AppContext, tenantId: string) {
  const standing = await billingStanding(ctx, tenantId);
  if (!standing.enabled) return { ...standing, prices: [], usagePrice: null, paymentMethod: null };
  const catalogue = await loadCatalogue(ctx);
  const customer = standing.customerId
    ? await atProvider(() => paymentProvider(ctx).customers.retrieve(standing.customerId!, { expand: ['invoice_settings.default_payment_method'] }))
    : null;
  return {
    ...standing,
    prices: [...catalogue.plans.values()].map(({ planId, amount, currency, interval }) => ({ planId, amount, currency, interval })),
    usagePrice: catalogue.usage ? { amount: catalogue.usage.amount, currency: catalogue.usage.currency, perSolverSeconds: catalogue.usage.perSolverSeconds } : null,
    paymentMethod: customer && !customer.deleted ? paymentMethodView(customer.invoice_settings?.default_payment_method) : null,
  };
}

const invoiceView = (i: Stripe.Invoice) => ({
  id: i.id,
  number: i.number,
  status: i.status,
  reason: i.billing_reason,
  total: i.total,
  amountDue: i.amount_due,
  amountPaid: i.amount_paid,
  amountRemaining: i.amount_remaining,
  currency: i.currency,
  createdAt: fromUnix(i.created)!,
  periodStart: fromUnix(i.period_start),
  periodEnd: fromUnix(i.period_end),
  paidAt: fromUnix(i.status_transitions?.paid_at),
  hostedUrl: i.hosted_invoice_url ?? null,
  pdfUrl: i.invoice_pdf ?? null,
});

/** The tenant's invoices at the provider, newest first, a page at a time (the cursor is the last invoice's id). */
export async function listInvoices(ctx: AppContext, tenantId: string, page: { limit?: number; cursor?: string }) {
  const provider = paymentProvider(ctx);
  const account = await findBillingAccount(ctx.db.manager, tenantId);
  if (!account?.customerId) return { items: [], nextCursor: null };
  const limit = page.limit ?? 10;
  let found: Stripe.ApiList<Stripe.Invoice>;
  try {
    found = await provider.invoices.list({ customer: account.customerId, limit, ...(page.cursor ? { starting_after: page.cursor } : {}) });
  } catch (err) {
    // A cursor the provider does not know is the caller's mistake, not an outage.
    if (page.cursor && err instanceof Stripe.errors.StripeInvalidRequestError) throw validationProblem([{ pointer: '/query/cursor', message: 'not a cursor this list returned' }]);
    throw providerProblem(err);
  }
  const items = found.data.map(invoiceView);
  return { items, nextCursor: found.has_more ? (items[items.length - 1]?.id ?? null) : null };
}

/** What the next invoice will be if nothing changes: the next period's plan price and this period's metered usage so far. */
export async function upcomingInvoice(ctx: AppContext, tenantId: string) {
  const provider = paymentProvider(ctx);
  const account = await findBillingAccount(ctx.db.manager, tenantId);
  if (!account || !isPaying(account.subscriptionStatus)) {
    throw noSubscription();
  }
  const preview = await atProvider(() => provider.invoices.createPreview({ customer: account.customerId!, subscription: account.subscriptionId! }));
  return {
    total: preview.total,
    amountDue: preview.amount_due,
    currency: preview.currency,
    periodStart: fromUnix(preview.period_start)!,
    periodEnd: fromUnix(preview.period_end)!,
    nextPaymentAt: fromUnix(preview.next_payment_attempt),
    lines: preview.lines.data.map((l) => ({
      description: l.description ?? '',
      amount: l.amount,
      quantity: l.quantity ?? null,
      periodStart: fromUnix(l.period.start)!,
      periodEnd: fromUnix(l.period.end)!,
    })),
  };
}
