// Events the payment provider POSTs to Gridwright. Each is verified with the SDK's own signature
// check (a bad signature, or a timestamp older than BILLING_EVENT_TOLERANCE_SECONDS, is refused),
// then processed once: its id is recorded in `billing_events` in the transaction that applies it,
// under the tenant's billing lock. Processing never trusts the event's snapshot: it reads the
// customer's subscriptions from the provider, so events in any order lead to the same plan. A
// failure answers 503 and writes nothing, and the provider sends the event again.
import Stripe from 'stripe';
import type { AppContext } from '../context';
import { HttpProblem } from '../lib/problem';
import { billingAccountOfCustomer, lockBillingAccount } from './accounts';
import { paymentProvider } from './provider';
import { settleOutcome, syncLockedAccount, type SyncOutcome } from './subscription-sync';

/** The events that can change a tenant's plan; others are acknowledged and recorded as ignored. */
export const HANDLED_EVENTS = ['checkout.session.completed', 'invoice.paid', 'invoice.payment_failed', 'customer.subscription.updated', 'customer.subscription.deleted'] as const;

export type EventOutcome = 'processed' | 'duplicate' | 'ignored';

const signatureRefused = (reason: string) =>
  new HttpProblem({ status: 400, slug: 'billing-event-signature', title: 'The event signature is not valid', detail: reason });

function customerOf(event: Stripe.Event): string | null {
  const object = event.data.object as { customer?: string | { id: string } | null };
  const customer = object.customer;
  return typeof customer === 'string' ? customer : (customer?.id ?? null);
}

export function verifyProviderEvent(ctx: AppContext, payload: Buffer, signature: string | undefined): Stripe.Event {
  const provider = paymentProvider(ctx);
  if (!signature) throw signatureRefused('The Stripe-Signature header is missing.');
  try {
    return provider.webhooks.constructEvent(payload, signature, ctx.config.billing!.webhookSecret, ctx.config.billingEventToleranceSeconds);
  } catch (err) {
    if (err instanceof Stripe.errors.StripeSignatureVerificationError) {
      throw signatureRefused(/tolerance/i.test(err.message) ? 'The signature is older than the tolerance allows; a replayed event is refused.' : 'The signature does not match the body under the signing secret.');
    }
    throw signatureRefused('The body is not an event of the payment provider.');
  }
}

async function recordEvent(m: { query: (q: string, p: unknown[]) => Promise<unknown> }, event: Stripe.Event, tenantId: string | null) {
  await m.query(`INSERT INTO billing_events (event_id, type, tenant_id, created_at) VALUES ($1, $2, $3, to_timestamp($4))`, [event.id, event.type, tenantId, event.created]);
}

export async function receiveProviderEvent(ctx: AppContext, payload: Buffer, signature: string | undefined): Promise<{ outcome: EventOutcome; eventId: string }> {
  const event = verifyProviderEvent(ctx, payload, signature);
  const seen = await ctx.db.query(`SELECT 1 FROM billing_events WHERE event_id = $1`, [event.id]);
  if (seen.length) return { outcome: 'duplicate', eventId: event.id };
  const customerId = customerOf(event);
  const account = customerId ? await billingAccountOfCustomer(ctx.db.manager, customerId) : null;
  if (!(HANDLED_EVENTS as readonly string[]).includes(event.type) || !account) {
    // Not ours to act on (another kind, or a customer Gridwright did not make), but remembered so it is answered the same way again.
    await ctx.db.query(`INSERT INTO billing_events (event_id, type, created_at) VALUES ($1, $2, to_timestamp($3)) ON CONFLICT DO NOTHING`, [event.id, event.type, event.created]);
    return { outcome: 'ignored', eventId: event.id };
  }
  let outcome: EventOutcome = 'processed';
  const synced: SyncOutcome | null = await ctx.db.transaction(async (m) => {
    const locked = await lockBillingAccount(m, account.tenantId);
    // Checked again under the lock: the same event delivered twice at once is processed by one of them.
    if ((await m.query(`SELECT 1 FROM billing_events WHERE event_id = $1`, [event.id])).length) {
      outcome = 'duplicate';
      return null;
    }
    const result = await syncLockedAccount(ctx, m, locked, event.type);
    await recordEvent(m, event, locked.tenantId);
    return result;
  });
  await settleOutcome(ctx, synced);
  return { outcome, eventId: event.id };
}
