// The payment provider's official SDK, pointed at BILLING_API_URL when it is set (the local fake under
// `npm start` and the tests) and otherwise at the provider itself. Billing is off without keys.
import Stripe from 'stripe';
import type { AppContext } from '../context';
import { HttpProblem } from '../lib/problem';

const clients = new WeakMap<object, Stripe>();

export const billingEnabled = (ctx: Pick<AppContext, 'config'>) => ctx.config.billing !== null;

export const billingOff = () =>
  new HttpProblem({
    status: 409,
    slug: 'billing-off',
    title: 'Billing is off',
    detail: 'This Gridwright has no payment provider configured (BILLING_SECRET_KEY); plans are set by operators.',
  });

/** The SDK client of this process's configuration; throws `billingOff` when billing is not configured. */
export function paymentProvider(ctx: Pick<AppContext, 'config'>): Stripe {
  const billing = ctx.config.billing;
  if (!billing) throw billingOff();
  let client = clients.get(billing);
  if (!client) {
    const target = billing.apiUrl ? new URL(billing.apiUrl) : null;
    client = new Stripe(billing.secretKey, {
      maxNetworkRetries: 2,
      timeout: 15_000,
      telemetry: false,
      appInfo: { name: 'Gridwright' },
      ...(target ? { host: target.hostname, port: target.port || (target.protocol === 'https:' ? 443 : 80), protocol: target.protocol === 'https:' ? 'https' : 'http' } : {}),
    });
    clients.set(billing, client);
  }
  return client;
}

/**
 * A provider failure as the problem the caller gets: a declined card is 402 with the provider's
 * message (it is written for the card holder); anything else is 503, as the provider is a dependency
 * that may come back. Errors of our own pass through.
 */
export function providerProblem(err: unknown): unknown {
  if (err instanceof HttpProblem || !(err instanceof Stripe.errors.StripeError)) return err;
  if (err instanceof Stripe.errors.StripeCardError) {
    return new HttpProblem({
      status: 402,
      slug: 'payment-declined',
      title: 'The payment was declined',
      detail: `${err.message} Pay with another card from the billing page, then try again.`,
      extensions: { declineCode: err.decline_code ?? err.code ?? null },
    });
  }
  return new HttpProblem({
    status: 503,
    slug: 'payment-provider-unavailable',
    title: 'The payment provider did not answer',
    detail: 'The payment provider could not be reached or refused the request. Trying again is safe: each request to it is sent with an idempotency key.',
    headers: { 'Retry-After': '30' },
  });
}

/** Runs a call to the provider, turning its failures into problems (see `providerProblem`). */
export async function atProvider<T>(call: () => Promise<T>): Promise<T> {
  try {
    return await call();
  } catch (err) {
    throw providerProblem(err);
  }
}
