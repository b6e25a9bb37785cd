// The pages the provider hosts for the buyer: a checkout page with a card form, and an invoice page
// (paid, or open with a card form to pay it). Plain HTML forms, our own look; the ids in their
// addresses are the only key to them, as with the provider's hosted links.
import express, { type Router } from 'express';
import { ProviderError } from './errors';
import type { Ledger } from './ledger';
import type { Account } from './store';
import type { Invoice } from './objects';

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export const formatAmount = (cents: number, currency: string) =>
  new Intl.NumberFormat('en-GB', { style: 'currency', currency: currency.toUpperCase() }).format(cents / 100);

const formatDate = (unix: number) => new Date(unix * 1000).toISOString().slice(0, 10);

function page(title: string, body: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>
  body { font: 15px/1.45 system-ui, sans-serif; background: #eef1ee; color: #1f2a24; margin: 0; }
  main { max-width: 30rem; margin: 2.5rem auto; background: #fff; border: 1px solid #c9d3cb; border-radius: 6px; padding: 1.5rem 1.75rem; }
  h1 { font-size: 1.2rem; margin: 0 0 .25rem; }
  .notice { background: #fff7df; border: 1px solid #e3cf8c; padding: .5rem .75rem; font-size: 13px; border-radius: 4px; }
  table { width: 100%; border-collapse: collapse; margin: 1rem 0; font-size: 14px; }
  td { padding: .3rem 0; border-bottom: 1px solid #e3e8e4; } td.amount { text-align: right; font-variant-numeric: tabular-nums; }
  label { display: block; margin-top: .75rem; font-size: 13px; font-weight: 600; }
  input { width: 100%; box-sizing: border-box; padding: .45rem .5rem; font: inherit; border: 1px solid #9fb0a4; border-radius: 4px; }
  .row { display: flex; gap: .75rem; } .row > div { flex: 1; }
  button { margin-top: 1.1rem; width: 100%; padding: .6rem; font: inherit; font-weight: 600; background: #2f6b4f; color: #fff; border: 0; border-radius: 4px; cursor: pointer; }
  .error { color: #9b1c1c; background: #fdecec; border: 1px solid #efb8b8; padding: .5rem .75rem; border-radius: 4px; margin-top: .75rem; }
  .muted { color: #5d6b61; font-size: 13px; }
  code { font-size: 12px; }
</style></head><body><main>${body}</main></body></html>`;
}

const TEST_CARD_NOTICE = `<p class="notice">A local stand-in for the payment provider: no money moves. Test cards:
<code>4242 4242 4242 4242</code> accepted, <code>4000 0000 0000 0002</code> declined,
<code>4000 0000 0000 0341</code> accepted now and declined at every later charge. Any future expiry and any three digits.</p>`;

function cardForm(action: string, button: string, values: { number?: string; expiry?: string; name?: string }, error: string | null): string {
  return `<form method="post" action="${escapeHtml(action)}">
  <label for="name">Name on card</label><input id="name" name="name" autocomplete="cc-name" value="${escapeHtml(values.name ?? '')}">
  <label for="number">Card number</label><input id="number" name="number" inputmode="numeric" autocomplete="cc-number" required value="${escapeHtml(values.number ?? '')}">
  <div class="row">
    <div><label for="expiry">Expiry (MM/YY)</label><input id="expiry" name="expiry" autocomplete="cc-exp" required placeholder="MM/YY" value="${escapeHtml(values.expiry ?? '')}"></div>
    <div><label for="cvc">Security code</label><input id="cvc" name="cvc" inputmode="numeric" autocomplete="cc-csc" required></div>
  </div>
  ${error ? `<p class="error" role="alert">${escapeHtml(error)}</p>` : ''}
  <button type="submit">${escapeHtml(button)}</button>
</form>`;
}

function linesTable(rows: { description: string; amount: number }[], currency: string, totalLabel: string): string {
  const total = rows.reduce((sum, r) => sum + r.amount, 0);
  return `<table>${rows.map((r) => `<tr><td>${escapeHtml(r.description)}</td><td class="amount">${formatAmount(r.amount, currency)}</td></tr>`).join('')}
<tr><td><strong>${escapeHtml(totalLabel)}</strong></td><td class="amount"><strong>${formatAmount(total, currency)}</strong></td></tr></table>`;
}

function invoicePage(invoice: Invoice, error: string | null, values: { number?: string; expiry?: string; name?: string } = {}): string {
  const rows = invoice.lines.data.map((l) => ({ description: l.description ?? '', amount: l.amount }));
  const state =
    invoice.status === 'paid'
      ? `<p><strong>Paid</strong> on ${formatDate(invoice.status_transitions.paid_at!)}.</p>`
      : invoice.status === 'open'
        ? `<p><strong>Open</strong>: ${formatAmount(invoice.amount_remaining, invoice.currency)} to pay${invoice.attempt_count ? ` (the card on file was declined ${invoice.attempt_count === 1 ? 'once' : `${invoice.attempt_count} times`})` : ''}.</p>${TEST_CARD_NOTICE}${cardForm(`/pay/invoices/${invoice.id}`, `Pay ${formatAmount(invoice.amount_remaining, invoice.currency)}`, values, error)}`
        : `<p><strong>${escapeHtml(String(invoice.status))}</strong></p>`;
  return page(`Invoice ${invoice.number}`, `<h1>Invoice ${escapeHtml(invoice.number ?? invoice.id)}</h1>
<p class="muted">Issued ${formatDate(invoice.created)} · period ${formatDate(invoice.period_start)} – ${formatDate(invoice.period_end)}</p>
${linesTable(rows, invoice.currency, 'Total')}${state}`);
}

type CardBody = { number?: string; expiry?: string; cvc?: string; name?: string };
const cardEntry = (b: CardBody) => ({ number: String(b.number ?? ''), expiry: String(b.expiry ?? ''), cvc: String(b.cvc ?? ''), name: String(b.name ?? '') });

export function hostedPages(ledger: Ledger): Router {
  const r = express.Router({ caseSensitive: true, strict: true });
  const form = express.urlencoded({ extended: false, limit: '16kb' });
  const find = (kind: 'checkoutSessions' | 'invoices', id: string): Account | null => ledger.store.accountHolding(kind, id);

  r.get('/pay/checkout/:id', (req, res) => {
    const account = find('checkoutSessions', req.params.id);
    const session = account?.checkoutSessions[req.params.id];
    if (!account || !session) return res.status(404).type('html').send(page('Not found', '<h1>This checkout link is not valid.</h1>'));
    if (session.status !== 'open') return res.type('html').send(page('Checkout', `<h1>This checkout is ${escapeHtml(String(session.status))}.</h1>`));
    res.type('html').send(checkoutPage(ledger, account, req.params.id, null));
  });

  r.post('/pay/checkout/:id', form, (req, res) => {
    const account = find('checkoutSessions', req.params.id);
    const session = account?.checkoutSessions[req.params.id];
    if (!account || !session) return res.status(404).type('html').send(page('Not found', '<h1>This checkout link is not valid.</h1>'));
    const entry = cardEntry(req.body ?? {});
    try {
      ledger.completeCheckout(account, session, entry);
    } catch (err) {
      if (!(err instanceof ProviderError)) throw err;
      return res.status(err.status).type('html').send(checkoutPage(ledger, account, session.id, err.message, entry));
    }
    res.redirect(303, session.success_url!.replace('{CHECKOUT_SESSION_ID}', session.id));
  });

  r.get('/pay/invoices/:id', (req, res) => {
    const account = find('invoices', req.params.id);
    const invoice = account?.invoices[req.params.id];
    if (!invoice) return res.status(404).type('html').send(page('Not found', '<h1>No such invoice.</h1>'));
    res.type('html').send(invoicePage(invoice, null));
  });

  r.post('/pay/invoices/:id', form, (req, res) => {
    const account = find('invoices', req.params.id);
    const invoice = account?.invoices[req.params.id];
    if (!account || !invoice) return res.status(404).type('html').send(page('Not found', '<h1>No such invoice.</h1>'));
    const entry = cardEntry(req.body ?? {});
    try {
      ledger.payWithCard(account, invoice, entry);
    } catch (err) {
      if (!(err instanceof ProviderError)) throw err;
      return res.status(err.status).type('html').send(invoicePage(invoice, err.message, entry));
    }
    res.redirect(303, `/pay/invoices/${invoice.id}`);
  });

  return r;
}

function checkoutPage(ledger: Ledger, account: Account, sessionId: string, error: string | null, values: { number?: string; expiry?: string; name?: string } = {}): string {
  const session = account.checkoutSessions[sessionId]!;
  const customer = session.customer ? account.customers[session.customer] : null;
  const items = session._items.map((item) => ledger.price(account, item.price));
  const licensed = items.filter((p) => p.recurring.usage_type === 'licensed');
  const metered = items.filter((p) => p.recurring.usage_type === 'metered');
  const currency = items[0]?.currency ?? 'eur';
  const rows = licensed.map((p) => ({ description: `${account.products[p.product]?.name ?? p.product}, every month`, amount: p.unit_amount ?? 0 }));
  const meteredNote = metered
    .map((p) => `<p class="muted">Plus ${escapeHtml(account.products[p.product]?.name ?? p.product)}: ${formatAmount(p.unit_amount ?? 0, p.currency)} per ${p.transform_quantity ? `started block of ${p.transform_quantity.divide_by} units` : 'unit'}, billed after each month.</p>`)
    .join('');
  return page('Checkout', `<h1>Subscribe</h1>
<p class="muted">${customer?.email ? `For ${escapeHtml(customer.email)}` : ''}</p>
${linesTable(rows, currency, 'Due today')}${meteredNote}${TEST_CARD_NOTICE}
${cardForm(`/pay/checkout/${sessionId}`, 'Pay and subscribe', values, error)}
${session.cancel_url ? `<p class="muted"><a href="${escapeHtml(session.cancel_url)}">Cancel and go back</a></p>` : ''}`);
}
