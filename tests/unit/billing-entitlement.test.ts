// Which plan a tenant has from its billing account and its subscription as the provider shows it
// (api/src/billing/entitlement.ts), case by case; each expectation is derived by hand from the rules
// written beside it.
import { describe, expect, it } from 'vitest';
import { decidingSubscription, entitlement, type AccountState, type ProviderSubscription } from '../../api/src/billing/entitlement';

const at = (day: number) => new Date(Date.UTC(2027, 0, day));
const noAccount: AccountState = {
  subscriptionId: null,
  subscriptionStatus: null,
  subscriptionPlanId: null,
  currentPeriodStart: null,
  currentPeriodEnd: null,
  cancelAtPeriodEnd: false,
  heldPlanId: null,
  heldUntil: null,
  graceEndsAt: null,
  grantedPlanId: null,
};
const subscription = (over: Partial<ProviderSubscription> = {}): ProviderSubscription => ({
  id: 'sub_1',
  status: 'active',
  planId: 'field',
  planItemId: 'si_1',
  periodStart: at(1),
  periodEnd: at(32),
  cancelAtPeriodEnd: false,
  ...over,
});
const decide = (account: Partial<AccountState>, sub: ProviderSubscription | null, currentPlanId = 'pilot') =>
  entitlement({ account: { ...noAccount, ...account }, subscription: sub, currentPlanId, freePlanId: 'pilot', now: at(10), graceDays: 7 });

describe('entitlement', () => {
  it('gives the plan of a paying subscription and follows it', () => {
    const next = decide({}, subscription());
    expect(next.planId).toBe('field');
    expect(next.account).toMatchObject({ subscriptionId: 'sub_1', subscriptionStatus: 'active', subscriptionPlanId: 'field', currentPeriodEnd: at(32) });
    expect(next.notices).toEqual([]);
  });

  it('keeps the plan paid for until the provider starts the period a downgrade was scheduled for', () => {
    const held = { subscriptionId: 'sub_1', subscriptionStatus: 'active' as const, heldPlanId: 'fleet', heldUntil: at(32) };
    // Same period: the price already says field, the tenant keeps fleet.
    expect(decide(held, subscription(), 'fleet')).toMatchObject({ planId: 'fleet', account: { heldPlanId: 'fleet' } });
    // The renewal started the period at the scheduled instant: field from now on, the hold gone.
    expect(decide(held, subscription({ periodStart: at(32), periodEnd: at(60) }), 'fleet')).toMatchObject({ planId: 'field', account: { heldPlanId: null, heldUntil: null } });
  });

  it('starts a grace period of graceDays when the subscription is first seen past due, once, keeping the plan', () => {
    const first = decide({ subscriptionId: 'sub_1', subscriptionStatus: 'active' }, subscription({ status: 'past_due' }), 'field');
    // 10 January + 7 days.
    expect(first).toMatchObject({ planId: 'field', notices: ['grace-started'], account: { graceEndsAt: at(17) } });
    const again = decide(first.account, subscription({ status: 'past_due' }), 'field');
    expect(again).toMatchObject({ notices: [], account: { graceEndsAt: at(17) } });
    expect(decide(first.account, subscription(), 'field')).toMatchObject({ notices: ['payment-recovered'], account: { graceEndsAt: null } });
  });

  it('falls back to the free plan when the followed subscription ends, saying whether the grace ran out', () => {
    const following = { subscriptionId: 'sub_1', subscriptionStatus: 'active' as const, subscriptionPlanId: 'field' };
    expect(decide(following, subscription({ status: 'canceled' }), 'field')).toMatchObject({ planId: 'pilot', notices: ['subscription-ended'], account: { subscriptionId: null } });
    expect(decide({ ...following, subscriptionStatus: 'past_due', graceEndsAt: at(9) }, subscription({ status: 'canceled' }), 'field')).toMatchObject({
      planId: 'pilot',
      notices: ['lapsed-after-grace'],
      account: { graceEndsAt: null },
    });
    expect(decide(following, null, 'field')).toMatchObject({ planId: 'pilot', notices: ['subscription-ended'] });
  });

  it('leaves a plan alone when no subscription was ever followed (an unfinished checkout)', () => {
    expect(decide({}, subscription({ status: 'incomplete' }), 'field')).toMatchObject({ planId: 'field', notices: [], account: { subscriptionId: null } });
    expect(decide({}, null, 'field')).toMatchObject({ planId: 'field', notices: [] });
  });

  it("puts an operator's grant ahead of whatever the provider says", () => {
    expect(decide({ grantedPlanId: 'fleet' }, subscription()).planId).toBe('fleet');
    expect(decide({ grantedPlanId: 'fleet', subscriptionId: 'sub_1' }, subscription({ status: 'canceled' })).planId).toBe('fleet');
  });

  it('decides on a paying subscription before the one followed, and on the followed one to see it end', () => {
    const ended = subscription({ id: 'sub_old', status: 'canceled' });
    const paying = subscription({ id: 'sub_new' });
    expect(decidingSubscription([paying, ended], 'sub_old')?.id).toBe('sub_new');
    expect(decidingSubscription([ended], 'sub_old')?.id).toBe('sub_old');
    expect(decidingSubscription([ended], null)).toBeNull();
  });
});
