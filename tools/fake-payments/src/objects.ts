// The provider's objects as this fake keeps them: each the subset of the SDK's own type that the fake
// fills in (Pick<> over the SDK's types, so a field with the wrong name or shape fails to compile).
import type Stripe from 'stripe';

export type Customer = Pick<Stripe.Customer, 'id' | 'object' | 'created' | 'email' | 'name' | 'metadata' | 'livemode'> & {
  invoice_settings: { default_payment_method: string | null };
};

/** The card's brand, last four digits and expiry: all a provider shows of a card, never its number. */
export type PaymentMethod = Pick<Stripe.PaymentMethod, 'id' | 'object' | 'created' | 'livemode' | 'type' | 'metadata'> & {
  customer: string | null;
  card: Pick<Stripe.PaymentMethod.Card, 'brand' | 'last4' | 'exp_month' | 'exp_year' | 'funding' | 'country'>;
  billing_details: { name: string | null };
};

export type Product = Pick<Stripe.Product, 'id' | 'object' | 'created' | 'name' | 'active' | 'livemode' | 'metadata'>;

export type Price = Pick<Stripe.Price, 'id' | 'object' | 'created' | 'active' | 'currency' | 'lookup_key' | 'nickname' | 'unit_amount' | 'livemode' | 'metadata' | 'type'> & {
  product: string;
  recurring: Pick<Stripe.Price.Recurring, 'interval' | 'interval_count' | 'usage_type' | 'meter'>;
  transform_quantity: Stripe.Price.TransformQuantity | null;
  billing_scheme: 'per_unit';
};

export type Meter = Pick<Stripe.Billing.Meter, 'id' | 'object' | 'created' | 'display_name' | 'event_name' | 'livemode' | 'status'> & {
  default_aggregation: { formula: 'sum' };
};

export type CheckoutSession = Pick<
  Stripe.Checkout.Session,
  | 'id'
  | 'object'
  | 'created'
  | 'expires_at'
  | 'livemode'
  | 'mode'
  | 'status'
  | 'payment_status'
  | 'client_reference_id'
  | 'success_url'
  | 'cancel_url'
  | 'url'
  | 'metadata'
  | 'currency'
  | 'amount_total'
> & {
  customer: string | null;
  subscription: string | null;
  invoice: string | null;
  /** Not part of the object the API shows: what the session sells, and metadata for its subscription. */
  _items: { price: string; quantity?: number }[];
  _subscriptionMetadata: Record<string, string>;
};

export type SubscriptionItem = Pick<Stripe.SubscriptionItem, 'id' | 'object' | 'created' | 'current_period_start' | 'current_period_end' | 'metadata' | 'subscription'> & {
  price: Price;
  quantity?: number;
};

export type Subscription = Pick<
  Stripe.Subscription,
  | 'id'
  | 'object'
  | 'created'
  | 'start_date'
  | 'status'
  | 'cancel_at_period_end'
  | 'cancel_at'
  | 'canceled_at'
  | 'ended_at'
  | 'currency'
  | 'livemode'
  | 'metadata'
  | 'billing_cycle_anchor'
  | 'collection_method'
> & {
  customer: string;
  default_payment_method: string | null;
  latest_invoice: string | null;
  items: List<SubscriptionItem>;
};

export type InvoiceLine = Pick<Stripe.InvoiceLineItem, 'id' | 'object' | 'amount' | 'currency' | 'description' | 'livemode' | 'metadata' | 'quantity' | 'subtotal' | 'period'> & {
  invoice: string | null;
  subscription: string | null;
  pricing: { type: 'price_details'; price_details: { price: string; product: string }; unit_amount_decimal: string | null };
  parent: {
    type: 'subscription_item_details';
    invoice_item_details: null;
    subscription_item_details: { subscription: string; subscription_item: string; proration: boolean; invoice_item: null; proration_details: null };
  };
};

export type Invoice = Pick<
  Stripe.Invoice,
  | 'id'
  | 'object'
  | 'created'
  | 'livemode'
  | 'currency'
  | 'status'
  | 'number'
  | 'amount_due'
  | 'amount_paid'
  | 'amount_remaining'
  | 'subtotal'
  | 'total'
  | 'period_start'
  | 'period_end'
  | 'billing_reason'
  | 'attempt_count'
  | 'attempted'
  | 'next_payment_attempt'
  | 'collection_method'
  | 'metadata'
  | 'due_date'
> & {
  customer: string;
  hosted_invoice_url: string | null;
  invoice_pdf: string | null;
  lines: List<InvoiceLine>;
  parent: { type: 'subscription_details'; quote_details: null; subscription_details: { subscription: string; metadata: Record<string, string> } } | null;
  status_transitions: { finalized_at: number | null; paid_at: number | null; voided_at: number | null; marked_uncollectible_at: number | null };
};

export type MeterEvent = Pick<Stripe.Billing.MeterEvent, 'object' | 'created' | 'event_name' | 'identifier' | 'livemode' | 'payload' | 'timestamp'>;

export type WebhookEndpoint = Pick<Stripe.WebhookEndpoint, 'id' | 'object' | 'created' | 'url' | 'enabled_events' | 'status' | 'livemode' | 'metadata' | 'description'> & {
  secret: string;
};

export type ProviderEvent = Pick<Stripe.Event, 'id' | 'object' | 'created' | 'livemode' | 'api_version' | 'pending_webhooks'> & {
  type: string;
  data: { object: unknown; previous_attributes?: Record<string, unknown> };
  request: { id: string | null; idempotency_key: string | null };
};

export interface List<T> {
  object: 'list';
  data: T[];
  has_more: boolean;
  url: string;
}

export const list = <T>(data: T[], url: string, hasMore = false): List<T> => ({ object: 'list', data, has_more: hasMore, url });
