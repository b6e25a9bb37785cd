// What the fake does with money: customers' cards, subscriptions and their periods, invoices and
// their payment, metered usage, renewals when an account's clock passes a period's end. Every
// change is recorded as the event the provider would send.
import { checkCard, type CardEntry } from './cards';
import { cardDeclined, invalid, ProviderError } from './errors';
import { recordEvent, type Deliveries, type EventRequest } from './events';
import { list, type CheckoutSession, type Invoice, type InvoiceLine, type PaymentMethod, type Price, type Subscription, type SubscriptionItem } from './objects';
import { newId, nowOf, type Account, type Store } from './store';

const LIVE = new Set(['active', 'past_due', 'trialing']);

/** One calendar month later, in UTC (the 31st runs into the next month's last day as the provider does). */
export function addMonth(unixSeconds: number): number {
  const d = new Date(unixSeconds * 1000);
  const target = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1, d.getUTCHours(), d.getUTCMinutes(), d.getUTCSeconds()));
  const lastDay = new Date(Date.UTC(target.getUTCFullYear(), target.getUTCMonth() + 1, 0)).getUTCDate();
  target.setUTCDate(Math.min(d.getUTCDate(), lastDay));
  return Math.floor(target.getTime() / 1000);
}

export class Ledger {
  constructor(
    readonly store: Store,
    private readonly deliveries: Deliveries,
    readonly baseUrl: string,
  ) {}

  emit(account: Account, type: string, object: unknown, request: EventRequest | null = null, previous?: Record<string, unknown>) {
    const event = recordEvent(account, type, object, request, previous);
    this.store.changed();
    this.deliveries.deliver(account, event);
  }

  price(account: Account, id: string): Price {
    const price = account.prices[id];
    if (!price) throw invalid('price', `No such price: '${id}'`);
    return price;
  }

  /** Checks a card typed into a hosted page and keeps it as the customer's default payment method. */
  attachCard(account: Account, customerId: string, entry: CardEntry & { name: string }): PaymentMethod {
    const check = checkCard(entry, new Date(nowOf(account) * 1000));
    if (!check.ok) throw cardDeclined(check.code, check.declineCode, check.message);
    const method: PaymentMethod = {
      id: newId('pm'),
      object: 'payment_method',
      created: nowOf(account),
      livemode: false,
      type: 'card',
      metadata: {},
      customer: customerId,
      card: { brand: check.brand, last4: check.last4, exp_month: check.expMonth, exp_year: check.expYear, funding: 'credit', country: 'DE' },
      billing_details: { name: entry.name.trim() || null },
    };
    account.paymentMethods[method.id] = method;
    if (check.laterChargesDecline) account.declineAfterFirstCharge[method.id] = { firstChargeDone: false };
    const customer = account.customers[customerId]!;
    const previous = customer.invoice_settings.default_payment_method;
    customer.invoice_settings.default_payment_method = method.id;
    this.emit(account, 'payment_method.attached', method);
    this.emit(account, 'customer.updated', customer, null, { invoice_settings: { default_payment_method: previous } });
    return method;
  }

  /** Whether a charge on the payment method goes through. */
  private charge(account: Account, paymentMethodId: string | null): { ok: true } | { ok: false; error: ProviderError } {
    if (!paymentMethodId || !account.paymentMethods[paymentMethodId]) {
      return { ok: false, error: new ProviderError(402, 'card_error', 'The customer has no payment method to charge.', { code: 'payment_method_missing' }) };
    }
    const laterDecline = account.declineAfterFirstCharge[paymentMethodId];
    if (laterDecline?.firstChargeDone) return { ok: false, error: cardDeclined('card_declined', 'generic_decline', 'Your card was declined.') };
    if (laterDecline) laterDecline.firstChargeDone = true;
    return { ok: true };
  }

  private paymentMethodOf(account: Account, subscription: Subscription): string | null {
    return subscription.default_payment_method ?? account.customers[subscription.customer]?.invoice_settings.default_payment_method ?? null;
  }

  private line(account: Account, subscription: Subscription, item: SubscriptionItem, opts: { quantity: number; start: number; end: number; amount?: number; description?: string; proration?: boolean }): InvoiceLine {
    const price = item.price;
    const billedUnits = price.transform_quantity ? Math.ceil(opts.quantity / price.transform_quantity.divide_by) : opts.quantity;
    const amount = opts.amount ?? billedUnits * (price.unit_amount ?? 0);
    const productName = account.products[price.product]?.name ?? price.product;
    return {
      id: newId('il'),
      object: 'line_item',
      amount,
      subtotal: amount,
      currency: price.currency,
      description: opts.description ?? (price.recurring.usage_type === 'metered' ? `${opts.quantity} × ${productName} (at ${price.unit_amount} per ${price.transform_quantity?.divide_by ?? 1})` : `${opts.quantity} × ${productName}`),
      livemode: false,
      metadata: {},
      quantity: opts.quantity,
      period: { start: opts.start, end: opts.end },
      invoice: null,
      subscription: subscription.id,
      pricing: { type: 'price_details', price_details: { price: price.id, product: price.product }, unit_amount_decimal: price.unit_amount === null ? null : String(price.unit_amount) },
      parent: {
        type: 'subscription_item_details',
        invoice_item_details: null,
        subscription_item_details: { subscription: subscription.id, subscription_item: item.id, proration: opts.proration ?? false, invoice_item: null, proration_details: null },
      },
    };
  }

  /** The metered quantity of a customer's events for the meter of `price` in [start, end). */
  meteredQuantity(account: Account, customerId: string, price: Price, start: number, end: number): number {
    const meter = price.recurring.meter ? account.meters[price.recurring.meter] : null;
    if (!meter) return 0;
    return account.meterEvents
      .filter((e) => e.event_name === meter.event_name && e.payload.stripe_customer_id === customerId && e.timestamp >= start && e.timestamp < end)
      .reduce((sum, e) => sum + Number(e.payload.value), 0);
  }

  /** The subscription's licensed prices for the period [start, end), billed in advance. */
  private licensedLines(account: Account, subscription: Subscription, start: number, end: number): InvoiceLine[] {
    return subscription.items.data
      .filter((item) => item.price.recurring.usage_type === 'licensed')
      .map((item) => this.line(account, subscription, item, { quantity: item.quantity ?? 1, start, end }));
  }

  /** The metered usage of [start, end), billed in arrears. */
  private usageLines(account: Account, subscription: Subscription, start: number, end: number): InvoiceLine[] {
    return subscription.items.data
      .filter((item) => item.price.recurring.usage_type === 'metered')
      .map((item) => ({ item, quantity: this.meteredQuantity(account, subscription.customer, item.price, start, end) }))
      .filter(({ quantity }) => quantity > 0)
      .map(({ item, quantity }) => this.line(account, subscription, item, { quantity, start, end }));
  }

  private newInvoice(account: Account, subscription: Subscription, reason: Invoice['billing_reason'], lines: InvoiceLine[], period: { start: number; end: number }): Invoice {
    const id = newId('in');
    const total = lines.reduce((sum, l) => sum + l.amount, 0);
    const now = nowOf(account);
    account.invoiceCounter += 1;
    const invoice: Invoice = {
      id,
      object: 'invoice',
      created: now,
      livemode: false,
      currency: subscription.currency,
      status: 'open',
      number: `GWFAKE-${String(account.invoiceCounter).padStart(4, '0')}`,
      amount_due: total,
      amount_paid: 0,
      amount_remaining: total,
      subtotal: total,
      total,
      period_start: period.start,
      period_end: period.end,
      billing_reason: reason,
      attempt_count: 0,
      attempted: false,
      next_payment_attempt: now,
      collection_method: 'charge_automatically',
      metadata: {},
      due_date: null,
      customer: subscription.customer,
      hosted_invoice_url: `${this.baseUrl}/pay/invoices/${id}`,
      invoice_pdf: null,
      lines: list(lines.map((l) => ({ ...l, invoice: id })), `/v1/invoices/${id}/lines`),
      parent: { type: 'subscription_details', quote_details: null, subscription_details: { subscription: subscription.id, metadata: { ...subscription.metadata } } },
      status_transitions: { finalized_at: now, paid_at: null, voided_at: null, marked_uncollectible_at: null },
    };
    account.invoices[id] = invoice;
    subscription.latest_invoice = id;
    this.emit(account, 'invoice.created', invoice);
    this.emit(account, 'invoice.finalized', invoice);
    return invoice;
  }

  private markPaid(account: Account, invoice: Invoice) {
    const now = nowOf(account);
    invoice.status = 'paid';
    invoice.amount_paid = invoice.amount_due;
    invoice.amount_remaining = 0;
    invoice.attempted = true;
    invoice.next_payment_attempt = null;
    invoice.status_transitions.paid_at = now;
    this.emit(account, 'invoice.paid', invoice);
    const subscription = invoice.parent ? account.subscriptions[invoice.parent.subscription_details.subscription] : undefined;
    if (subscription?.status === 'past_due' && !Object.values(account.invoices).some((i) => i.status === 'open' && i.parent?.subscription_details.subscription === subscription.id)) {
      subscription.status = 'active';
      this.emit(account, 'customer.subscription.updated', subscription, null, { status: 'past_due' });
    }
  }

  /** Tries to collect an open invoice from the card on file; a decline leaves it open and the subscription past due. */
  collect(account: Account, invoice: Invoice, paymentMethodId: string | null): { ok: true } | { ok: false; error: ProviderError } {
    invoice.attempt_count += 1;
    invoice.attempted = true;
    const result = invoice.amount_due === 0 ? ({ ok: true } as const) : this.charge(account, paymentMethodId);
    if (result.ok) {
      this.markPaid(account, invoice);
      return result;
    }
    invoice.next_payment_attempt = null;
    this.emit(account, 'invoice.payment_failed', invoice);
    const subscription = invoice.parent ? account.subscriptions[invoice.parent.subscription_details.subscription] : undefined;
    if (subscription && subscription.status === 'active') {
      subscription.status = 'past_due';
      this.emit(account, 'customer.subscription.updated', subscription, null, { status: 'active' });
    }
    return result;
  }

  /** Pays an open invoice with a card typed into its hosted page; the card becomes the customer's default. */
  payWithCard(account: Account, invoice: Invoice, entry: CardEntry & { name: string }) {
    if (invoice.status !== 'open') throw invalid('invoice', `Invoice ${invoice.id} is ${invoice.status}; only an open invoice can be paid.`);
    const method = this.attachCard(account, invoice.customer, entry);
    const subscription = invoice.parent ? account.subscriptions[invoice.parent.subscription_details.subscription] : undefined;
    if (subscription) subscription.default_payment_method = method.id;
    const result = this.collect(account, invoice, method.id);
    if (!result.ok) throw result.error;
  }

  /** The subscription a completed checkout session starts, with its first invoice paid by the card just entered. */
  completeCheckout(account: Account, session: CheckoutSession, entry: CardEntry & { name: string }): Subscription {
    if (session.status !== 'open') throw invalid('session', `This checkout session is ${session.status}.`);
    const customerId = session.customer!;
    const method = this.attachCard(account, customerId, entry);
    const now = nowOf(account);
    const end = addMonth(now);
    const id = newId('sub');
    const items: SubscriptionItem[] = session._items.map((item) => {
      const price = this.price(account, item.price);
      return {
        id: newId('si'),
        object: 'subscription_item',
        created: now,
        current_period_start: now,
        current_period_end: end,
        metadata: {},
        subscription: id,
        price,
        ...(price.recurring.usage_type === 'licensed' ? { quantity: item.quantity ?? 1 } : {}),
      };
    });
    const subscription: Subscription = {
      id,
      object: 'subscription',
      created: now,
      start_date: now,
      status: 'active',
      cancel_at_period_end: false,
      cancel_at: null,
      canceled_at: null,
      ended_at: null,
      currency: items[0]?.price.currency ?? 'eur',
      livemode: false,
      metadata: { ...session._subscriptionMetadata },
      billing_cycle_anchor: now,
      collection_method: 'charge_automatically',
      customer: customerId,
      default_payment_method: method.id,
      latest_invoice: null,
      items: list(items, `/v1/subscription_items?subscription=${id}`),
    };
    account.subscriptions[id] = subscription;
    this.emit(account, 'customer.subscription.created', subscription);
    const invoice = this.newInvoice(account, subscription, 'subscription_create', this.licensedLines(account, subscription, now, end), { start: now, end: now });
    const paid = this.collect(account, invoice, method.id);
    if (!paid.ok) throw paid.error;
    session.status = 'complete';
    session.payment_status = 'paid';
    session.subscription = id;
    session.invoice = invoice.id;
    session.amount_total = invoice.total;
    this.emit(account, 'checkout.session.completed', session);
    return subscription;
  }

  /** Changes a subscription: its items' prices (prorated now or not at all) and whether it ends with its period. */
  updateSubscription(
    account: Account,
    subscription: Subscription,
    params: { items?: { id?: string; price?: string }[]; proration_behavior?: string; payment_behavior?: string; cancel_at_period_end?: boolean; metadata?: Record<string, string> },
    request: EventRequest,
  ): Subscription {
    if (!LIVE.has(subscription.status)) throw invalid('subscription', `A ${subscription.status} subscription cannot be updated.`);
    const previous: Record<string, unknown> = {};
    const changes = (params.items ?? []).map((change, i) => {
      const item = subscription.items.data.find((x) => x.id === change.id);
      if (!item) throw invalid(`items[${i}][id]`, `No such subscription item: '${change.id}'`);
      const price = change.price ? this.price(account, change.price) : item.price;
      if (price.recurring.usage_type !== item.price.recurring.usage_type) throw invalid(`items[${i}][price]`, 'A licensed item cannot take a metered price, nor the other way round.');
      return { item, price };
    });
    const proration = params.proration_behavior ?? 'create_prorations';
    if (proration === 'always_invoice') {
      const now = nowOf(account);
      const lines = changes
        .filter(({ item, price }) => price.id !== item.price.id && item.price.recurring.usage_type === 'licensed')
        .map(({ item, price }) => {
          const share = (item.current_period_end - now) / (item.current_period_end - item.current_period_start);
          const amount = Math.round(((price.unit_amount ?? 0) - (item.price.unit_amount ?? 0)) * (item.quantity ?? 1) * share);
          const name = account.products[price.product]?.name ?? price.product;
          return this.line(account, subscription, { ...item, price }, { quantity: item.quantity ?? 1, start: now, end: item.current_period_end, amount, description: `Remaining time on ${name} after the change`, proration: true });
        })
        .filter((line) => line.amount > 0);
      if (lines.length) {
        const first = changes[0]!.item;
        if (params.payment_behavior === 'error_if_incomplete') {
          // Nothing changes when the card declines: the proration is tried before anything is kept.
          const trial = this.charge(account, this.paymentMethodOf(account, subscription));
          if (!trial.ok) throw trial.error;
          this.applyItems(subscription, changes, previous);
          const invoice = this.newInvoice(account, subscription, 'subscription_update', lines, { start: now, end: first.current_period_end });
          invoice.attempt_count = 1;
          this.markPaid(account, invoice);
        } else {
          this.applyItems(subscription, changes, previous);
          const invoice = this.newInvoice(account, subscription, 'subscription_update', lines, { start: now, end: first.current_period_end });
          this.collect(account, invoice, this.paymentMethodOf(account, subscription));
        }
      } else {
        this.applyItems(subscription, changes, previous);
      }
    } else {
      this.applyItems(subscription, changes, previous);
    }
    if (params.cancel_at_period_end !== undefined && params.cancel_at_period_end !== subscription.cancel_at_period_end) {
      previous.cancel_at_period_end = subscription.cancel_at_period_end;
      subscription.cancel_at_period_end = params.cancel_at_period_end;
      subscription.cancel_at = params.cancel_at_period_end ? subscription.items.data[0]!.current_period_end : null;
    }
    if (params.metadata) subscription.metadata = { ...subscription.metadata, ...params.metadata };
    if (Object.keys(previous).length) this.emit(account, 'customer.subscription.updated', subscription, request, previous);
    return subscription;
  }

  private applyItems(subscription: Subscription, changes: { item: SubscriptionItem; price: Price }[], previous: Record<string, unknown>) {
    if (!changes.some(({ item, price }) => item.price.id !== price.id)) return;
    previous.items = structuredClone(subscription.items);
    for (const { item, price } of changes) item.price = price;
  }

  /** Ends a subscription at once; its unpaid invoices stay as they are. */
  cancelSubscription(account: Account, subscription: Subscription, request: EventRequest | null) {
    if (subscription.status === 'canceled') return subscription;
    const now = nowOf(account);
    const previous = { status: subscription.status };
    subscription.status = 'canceled';
    subscription.canceled_at = now;
    subscription.ended_at = now;
    subscription.cancel_at_period_end = false;
    this.emit(account, 'customer.subscription.deleted', subscription, request, previous);
    return subscription;
  }

  /** What the next invoice would be: the next period's licensed prices and the metered usage of the current period so far. */
  preview(account: Account, subscription: Subscription): Invoice {
    const item = subscription.items.data[0]!;
    const start = item.current_period_end;
    const lines = [
      ...(subscription.cancel_at_period_end ? [] : this.licensedLines(account, subscription, start, addMonth(start))),
      ...this.usageLines(account, subscription, item.current_period_start, nowOf(account) + 1),
    ];
    const total = lines.reduce((sum, l) => sum + l.amount, 0);
    const id = `upcoming_${subscription.id}`;
    return {
      id,
      object: 'invoice',
      created: nowOf(account),
      livemode: false,
      currency: subscription.currency,
      status: 'draft',
      number: null,
      amount_due: total,
      amount_paid: 0,
      amount_remaining: total,
      subtotal: total,
      total,
      period_start: item.current_period_start,
      period_end: item.current_period_end,
      billing_reason: 'upcoming',
      attempt_count: 0,
      attempted: false,
      next_payment_attempt: item.current_period_end,
      collection_method: 'charge_automatically',
      metadata: {},
      due_date: null,
      customer: subscription.customer,
      hosted_invoice_url: null,
      invoice_pdf: null,
      lines: list(lines, `/v1/invoices/${id}/lines`),
      parent: { type: 'subscription_details', quote_details: null, subscription_details: { subscription: subscription.id, metadata: { ...subscription.metadata } } },
      status_transitions: { finalized_at: null, paid_at: null, voided_at: null, marked_uncollectible_at: null },
    };
  }

  /** Renews or ends every subscription whose period has ended by the account's clock, one period at a time. */
  renewDue(account: Account) {
    const now = nowOf(account);
    for (const subscription of Object.values(account.subscriptions)) {
      while (LIVE.has(subscription.status) && subscription.items.data[0]!.current_period_end <= now) {
        const periodStart = subscription.items.data[0]!.current_period_start;
        const periodEnd = subscription.items.data[0]!.current_period_end;
        if (subscription.cancel_at_period_end) {
          // The last period's metered usage is still billed.
          const usage = this.usageLines(account, subscription, periodStart, periodEnd);
          if (usage.length) this.collect(account, this.newInvoice(account, subscription, 'subscription_cycle', usage, { start: periodStart, end: periodEnd }), this.paymentMethodOf(account, subscription));
          const previous = { status: subscription.status };
          subscription.status = 'canceled';
          subscription.canceled_at = periodEnd;
          subscription.ended_at = periodEnd;
          this.emit(account, 'customer.subscription.deleted', subscription, null, previous);
          break;
        }
        const nextEnd = addMonth(periodEnd);
        for (const item of subscription.items.data) {
          item.current_period_start = periodEnd;
          item.current_period_end = nextEnd;
        }
        this.emit(account, 'customer.subscription.updated', subscription, null, { items: { current_period_start: periodStart } });
        const invoice = this.newInvoice(account, subscription, 'subscription_cycle', [...this.licensedLines(account, subscription, periodEnd, nextEnd), ...this.usageLines(account, subscription, periodStart, periodEnd)], { start: periodStart, end: periodEnd });
        this.collect(account, invoice, this.paymentMethodOf(account, subscription));
      }
    }
    this.store.changed();
  }
}
