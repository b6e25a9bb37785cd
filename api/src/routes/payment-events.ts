import express, { type Router } from 'express';
import { receiveProviderEvent } from '../billing/provider-events';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';

/** The largest event body read; the provider's events are a few kilobytes. */
export const PAYMENT_EVENT_LIMIT_BYTES = 512 * 1024;

/**
 * The payment provider's events. Mounted before the JSON parser: the signature covers the exact bytes
 * sent, so the body is kept raw until it is verified.
 */
export function paymentEventsRouter(ctx: AppContext): Router {
  const r = strictRouter();
  r.post('/hooks/payments', express.raw({ type: () => true, limit: PAYMENT_EVENT_LIMIT_BYTES }), async (req, res) => {
    const body = Buffer.isBuffer(req.body) ? req.body : Buffer.alloc(0);
    res.json({ received: true, ...(await receiveProviderEvent(ctx, body, req.get('stripe-signature'))) });
  });
  return r;
}
