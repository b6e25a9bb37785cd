// An owner buys a plan in a real browser: the console's billing page, the fake payment provider's
// hosted checkout page (a declined card first, then an accepted one), back to the console, where the
// plan changes once the provider's signed events have arrived.
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startBillingApp, TEST_CARDS, type BillingTestApp } from '../support/fake-payments';
import { createTenantWithKey, createUserSession } from '../support/tenants';
import { launchBrowser, screenshot, type Browser } from './browser';

let b: BillingTestApp;
let browser: Browser;
let page: Page;
const pageErrors: string[] = [];

async function payWith(number: string) {
  await page.getByLabel('Card number').fill(number);
  await page.getByLabel('Expiry (MM/YY)').fill('12/34');
  await page.getByLabel('Security code').fill('123');
  await page.getByRole('button', { name: 'Pay and subscribe' }).click();
}

describe('buying a plan through the hosted checkout page', () => {
  beforeAll(async () => {
    b = await startBillingApp();
    const { tenantId } = await createTenantWithKey(b.t.ctx, { plan: 'pilot' });
    const owner = await createUserSession(b.t.ctx, b.t.app, { tenantId, role: 'owner' });
    browser = await launchBrowser();
    page = browser.page;
    page.on('pageerror', (e) => {
      pageErrors.push(e.message);
    });
    await page.goto(`${b.appUrl}/sign-in`);
    await page.getByLabel('E-mail').fill(owner.email);
    await page.getByLabel('Password').fill(owner.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByTestId('role').filter({ hasText: 'owner' }).waitFor();
  }, 120_000);

  afterAll(async () => {
    expect(pageErrors).toEqual([]);
    await browser?.close();
    await b?.close();
  });

  it('refuses a declined card on the provider page, takes an accepted one, and shows the new plan', async () => {
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Billing' }).click();
    await page.getByRole('table', { name: 'Plan comparison' }).waitFor();
    await screenshot(page, 'billing-free');
    await page.getByRole('button', { name: 'Subscribe to Field' }).click();

    await page.waitForURL(new RegExp(`^${b.providerUrl}/pay/checkout/`));
    await page.getByText('no money moves').waitFor();
    await payWith(TEST_CARDS.declined);
    await page.getByRole('alert').filter({ hasText: 'Your card was declined.' }).waitFor();
    await screenshot(page, 'billing-checkout-declined');
    await payWith(TEST_CARDS.accepted);

    await page.waitForURL(`${b.appUrl}/billing?checkout=complete`);
    await page.getByTestId('plan-standing').filter({ hasText: 'Paid through a monthly subscription.' }).waitFor();
    await expect(page.getByTestId('plan-standing').textContent()).resolves.toContain('Field');
    await expect(page.getByTestId('payment-method').textContent()).resolves.toMatch(/visa ending in 4242/i);
    await page.getByTestId('upcoming-invoice').waitFor();
    await page.getByRole('table', { name: 'Invoices' }).getByText('First month').waitFor();
    await screenshot(page, 'billing-subscribed');
  }, 120_000);
});
