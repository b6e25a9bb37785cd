// A customer's subscriptions as the provider shows them now, read into what billing decides on.
import type Stripe from 'stripe';
import type { AppContext } from '../context';
import type { Catalogue } from './catalogue';
import type { ProviderSubscription } from './entitlement';
import { atProvider, paymentProvider } from './provider';
import { isSubscriptionStatus } from './subscription-statuses';

export function readSubscription(subscription: Stripe.Subscription, catalogue: Catalogue): ProviderSubscription {
  const planItem = subscription.items.data.find((item) => catalogue.planOfPrice.has(item.price.id)) ?? null;
  const anyItem = planItem ?? subscription.items.data[0];
  if (!anyItem) throw new Error(`subscription ${subscription.id} has no items`);
  if (!isSubscriptionStatus(subscription.status)) throw new Error(`subscription ${subscription.id} has the unknown status ${subscription.status}`);
  return {
    id: subscription.id,
    status: subscription.status,
    planId: planItem ? catalogue.planOfPrice.get(planItem.price.id)! : null,
    planItemId: planItem?.id ?? null,
    periodStart: new Date(anyItem.current_period_start * 1000),
    periodEnd: new Date(anyItem.current_period_end * 1000),
    cancelAtPeriodEnd: subscription.cancel_at_period_end,
  };
}

/** Every subscription of the customer, newest first, cancelled ones included (to see an end). */
export async function customerSubscriptions(ctx: AppContext, customerId: string, catalogue: Catalogue): Promise<ProviderSubscription[]> {
  const page = await atProvider(() => paymentProvider(ctx).subscriptions.list({ customer: customerId, status: 'all', limit: 20 }));
  return page.data.map((s) => readSubscription(s, catalogue));
}
