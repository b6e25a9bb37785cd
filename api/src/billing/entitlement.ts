// Which plan a tenant has, given its billing account and its subscription as the provider shows it
// now. Pure: the sync reads the provider and the account, this decides, the sync writes. Because it
// starts from the provider's current state rather than from an event's snapshot, events may arrive
// in any order and any number of times and the outcome is the same.
import type { BillingAccount } from '../db/entities/billing-account';
import { PAYING_STATUSES, type SubscriptionStatus } from './subscription-statuses';

/** A subscription as far as billing needs it, read from the provider. */
export interface ProviderSubscription {
  id: string;
  status: SubscriptionStatus;
  /** The plan of its licensed price; null when the price is none of our plans'. */
  planId: string | null;
  /** The price item that carries the plan (its id is needed to change the plan). */
  planItemId: string | null;
  periodStart: Date;
  periodEnd: Date;
  cancelAtPeriodEnd: boolean;
}

export type AccountState = Pick<
  BillingAccount,
  'subscriptionId' | 'subscriptionStatus' | 'subscriptionPlanId' | 'currentPeriodStart' | 'currentPeriodEnd' | 'cancelAtPeriodEnd' | 'heldPlanId' | 'heldUntil' | 'graceEndsAt' | 'grantedPlanId'
>;

/** What changed that someone should hear about (the owners get e-mail). */
export type BillingNotice = 'grace-started' | 'payment-recovered' | 'subscription-ended' | 'lapsed-after-grace';

export interface Entitlement {
  account: AccountState;
  /** The plan the tenant has from now on. */
  planId: string;
  notices: BillingNotice[];
}

export const isPaying = (status: SubscriptionStatus | null) => status !== null && PAYING_STATUSES.includes(status);

/**
 * The subscription that decides the plan among a customer's subscriptions (newest first): a paying
 * one, else the one the account follows (to see that it ended), else none.
 */
export function decidingSubscription(subscriptions: ProviderSubscription[], followed: string | null): ProviderSubscription | null {
  return subscriptions.find((s) => isPaying(s.status) && s.planId !== null) ?? subscriptions.find((s) => s.id === followed) ?? null;
}

export function entitlement(input: {
  account: AccountState;
  subscription: ProviderSubscription | null;
  currentPlanId: string;
  freePlanId: string;
  now: Date;
  graceDays: number;
}): Entitlement {
  const { subscription, now } = input;
  const account = { ...input.account };
  const notices: BillingNotice[] = [];
  let paidPlanId: string | null;

  if (subscription && isPaying(subscription.status) && subscription.planId) {
    account.subscriptionId = subscription.id;
    account.subscriptionStatus = subscription.status;
    account.subscriptionPlanId = subscription.planId;
    account.currentPeriodStart = subscription.periodStart;
    account.currentPeriodEnd = subscription.periodEnd;
    account.cancelAtPeriodEnd = subscription.cancelAtPeriodEnd;
    // A downgrade takes effect when the provider has started the period it was scheduled for.
    if (account.heldUntil && subscription.periodStart.getTime() >= account.heldUntil.getTime()) {
      account.heldPlanId = null;
      account.heldUntil = null;
    }
    paidPlanId = account.heldPlanId ?? subscription.planId;
    if (subscription.status === 'past_due') {
      if (!account.graceEndsAt) {
        account.graceEndsAt = new Date(now.getTime() + input.graceDays * 86_400_000);
        notices.push('grace-started');
      }
    } else if (account.graceEndsAt) {
      account.graceEndsAt = null;
      notices.push('payment-recovered');
    }
  } else if (account.subscriptionId && (!subscription || subscription.id === account.subscriptionId)) {
    // The subscription the tenant paid with has ended (cancelled, unpaid, expired) or is gone.
    notices.push(account.graceEndsAt ? 'lapsed-after-grace' : 'subscription-ended');
    account.subscriptionId = null;
    account.subscriptionStatus = null;
    account.subscriptionPlanId = null;
    account.currentPeriodStart = null;
    account.currentPeriodEnd = null;
    account.cancelAtPeriodEnd = false;
    account.heldPlanId = null;
    account.heldUntil = null;
    account.graceEndsAt = null;
    paidPlanId = input.freePlanId;
  } else {
    // No subscription was ever followed (a checkout not finished, or none): the plan stays as set.
    paidPlanId = null;
  }

  return { account, planId: account.grantedPlanId ?? paidPlanId ?? input.currentPlanId, notices };
}
