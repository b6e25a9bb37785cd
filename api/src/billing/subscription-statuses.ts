/** The provider's subscription statuses, as its API documents them. */
export const SUBSCRIPTION_STATUSES = ['incomplete', 'incomplete_expired', 'trialing', 'active', 'past_due', 'canceled', 'unpaid', 'paused'] as const;
export type SubscriptionStatus = (typeof SUBSCRIPTION_STATUSES)[number];

/** Statuses in which a subscription pays for its plan: during `past_due` the tenant is in its grace period. */
export const PAYING_STATUSES: readonly SubscriptionStatus[] = ['active', 'trialing', 'past_due'];

export const isSubscriptionStatus = (s: string): s is SubscriptionStatus => (SUBSCRIPTION_STATUSES as readonly string[]).includes(s);
