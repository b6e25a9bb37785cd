// The console in a real browser against the real app: demo accounts, a real worker solving with HiGHS,
// the loopback mail server. One browser, one page; each step builds on the one before.
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { exampleSites } from '@gridwright/shared/examples';
import { screenshot, type Browser } from './browser';
import type { ConsoleApp } from './console-app';
import { consoleInBrowser, demoAccount, setEditorText } from './console-in-browser';

let app: ConsoleApp;
let browser: Browser;
let page: Page;

async function signIn(role: string) {
  await browser.context.clearCookies();
  await page.goto(`${app.url}/sign-in`);
  const { email, password } = demoAccount(app, role);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('role').filter({ hasText: role }).waitFor();
}

describe('console in a browser', () => {
  const session = consoleInBrowser();
  beforeAll(() => {
    ({ app, browser, page } = session);
  });

  it('signs the demo developer in and lists runs', async () => {
    await page.goto(`${app.url}/`);
    await page.waitForURL(/\/sign-in$/);
    await screenshot(page, 'sign-in');
    await signIn('developer');
    await page.getByRole('heading', { name: 'Runs' }).waitFor();
    await expect(page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'API keys' }).isVisible()).resolves.toBe(true);
  });

  it('creates an API key and shows its secret exactly once', async () => {
    // A busy machine as the page sees it (CPU 20× slower). When navigations ran in a transition,
    // the runs page stayed on screen, taking input, for a while after this click: the key's name
    // went into its "Name contains" filter and "Create key" stayed disabled. A click now shows the
    // new page at once, whatever the load.
    const cdp = await page.context().newCDPSession(page);
    await cdp.send('Emulation.setCPUThrottlingRate', { rate: 20 });
    await page.getByRole('link', { name: 'API keys' }).click();
    const headingAfterClick = await page.evaluate(() => document.querySelector('main h1')?.textContent);
    await cdp.send('Emulation.setCPUThrottlingRate', { rate: 1 });
    await cdp.detach();
    expect(headingAfterClick).toBe('API keys');
    await page.getByLabel('Name', { exact: true }).fill('e2e-bridge');
    await page.getByRole('button', { name: 'Create key' }).click();
    const secret = await page.getByTestId('new-key-secret').textContent();
    expect(secret).toMatch(/^gw_[0-9a-f]{12}_[A-Za-z0-9_-]{43}$/);
    await page.getByRole('table', { name: 'API keys' }).getByText('e2e-bridge').waitFor();
    await screenshot(page, 'keys');
    await page.getByRole('button', { name: 'I have stored it' }).click();
    await page.reload();
    await page.getByRole('table', { name: 'API keys' }).getByText('e2e-bridge').waitFor();
    expect(await page.content()).not.toContain(secret!);
  });

  // A solve on a loaded CI machine can take a while, so this step gets a longer limit than the default.
  it('checks, breaks, fixes and solves a template in the workbench, then inspects the run', async () => {
    await page.getByRole('link', { name: 'Workbench' }).click();
    const template = exampleSites[0];
    await page.getByLabel('Demo site').selectOption(template.id);
    await page.getByRole('button', { name: 'Load template' }).click();
    await page.getByTestId('editor-problems').filter({ hasText: 'No problems found.' }).waitFor();

    // stepMinutes must be one of 5, 10, 15, 30, 60 (SPEC.md §1); 7 is not.
    const broken = { ...template.spec, horizon: { ...template.spec.horizon, stepMinutes: 7 } };
    await setEditorText(page, JSON.stringify(broken, null, 2));
    const problems = page.getByRole('list', { name: 'Problems in the spec' });
    await problems.getByText(/stepMinutes|one of 5, 10, 15, 30, 60/).first().waitFor();
    await problems.getByRole('button').first().click();
    await page.locator('.cm-lintRange-error').first().waitFor();
    await page.getByRole('button', { name: 'Check' }).click();
    await page.getByTestId('check-report').filter({ hasText: 'problem' }).waitFor();
    // The API's answer lands in the editor's one problem list, beside the console's own check.
    await expect(problems.getByRole('button').filter({ hasText: 'API' }).textContent()).resolves.toMatch(/one of 5, 10, 15, 30, 60/);
    await screenshot(page, 'workbench-error');

    await setEditorText(page, JSON.stringify(template.spec, null, 2));
    await page.getByTestId('editor-problems').filter({ hasText: 'No problems found.' }).waitFor();
    await page.getByRole('button', { name: 'Check' }).click();
    await page.getByTestId('check-report').filter({ hasText: 'The spec is valid.' }).waitFor();
    await page.getByRole('button', { name: 'Solve' }).click();
    await page.getByTestId('followed-run').getByText('succeeded').waitFor({ timeout: 120_000 });
    await screenshot(page, 'workbench');

    await page.getByRole('link', { name: 'Open run' }).click();
    await page.getByTestId('dispatch-charts').locator('svg.recharts-surface').first().waitFor();
    await page.getByText('Schedules are advisory.').first().waitFor();
    await expect(page.getByTestId('run-status').textContent()).resolves.toContain('succeeded');
    await screenshot(page, 'run-detail');

    await page.getByRole('tab', { name: 'Formulation report' }).click();
    await page.getByTestId('formulation-report').getByRole('figure', { name: 'Coefficient ranges on a log scale' }).waitFor();
    await page.getByRole('table', { name: 'Rolling windows' }).waitFor();
    await screenshot(page, 'formulation-report');

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Download CSV' }).click()]);
    const csv = readFileSync((await download.path())!, 'utf8');
    const lines = csv.trim().split(/\r?\n/);
    // One header line and one line per step of the template's horizon.
    expect(lines.length).toBe(template.spec.horizon.steps + 1);

    const nav = page.getByRole('navigation', { name: 'Main' });
    await nav.getByRole('link', { name: 'Runs' }).click();
    await page.getByRole('table', { name: 'Runs' }).getByText(template.spec.name!).waitFor();
    await screenshot(page, 'runs');
    await nav.getByRole('link', { name: 'Usage' }).click();
    await page.getByTestId('usage-charts').locator('svg.recharts-surface').first().waitFor();
    await screenshot(page, 'usage');

    for (const [link, heading, shot] of [
      ['Webhooks', 'Webhooks', 'webhooks'],
      ['CSV exports', 'CSV export profiles', 'export-profiles'],
      ['Team', 'Team', 'team'],
    ] as const) {
      await nav.getByRole('link', { name: link }).click();
      await page.getByRole('heading', { name: heading, exact: true }).waitFor();
      await expect.poll(() => page.getByRole('status').filter({ hasText: 'Loading' }).count(), { timeout: 15_000 }).toBe(0);
      await screenshot(page, shot);
    }
  }, 180_000);

  it('keeps the run screen usable at tablet width', async () => {
    await page.setViewportSize({ width: 820, height: 1100 });
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Runs' }).click();
    await page.getByRole('table', { name: 'Runs' }).getByRole('link').first().click();
    await page.getByTestId('dispatch-charts').locator('svg.recharts-surface').first().waitFor();
    await screenshot(page, 'run-detail-tablet');
    await page.setViewportSize({ width: 1280, height: 860 });
  });

  it('hides Keys from a viewer and refuses the route', async () => {
    await signIn('viewer');
    const nav = page.getByRole('navigation', { name: 'Main' });
    await nav.getByRole('link', { name: 'Runs' }).waitFor();
    expect(await nav.getByRole('link', { name: 'API keys' }).count()).toBe(0);
    await page.goto(`${app.url}/keys`);
    await page.getByText('Not available to your role').waitFor();
    expect(await page.getByRole('table', { name: 'API keys' }).count()).toBe(0);
  });

  it('lets the operator create a tenant and read the invitation in the outbox', async () => {
    await signIn('operator');
    await page.getByRole('heading', { name: 'Tenants' }).waitFor();
    await page.getByLabel('Slug', { exact: true }).fill('e2e-wind-farm');
    await page.getByLabel('Name', { exact: true }).fill('E2E Wind Farm');
    await page.getByLabel("First owner's e-mail").fill('owner@e2e-wind.example');
    await page.getByRole('button', { name: 'Create tenant' }).click();
    await page.getByRole('table', { name: 'Tenants' }).getByText('E2E Wind Farm').waitFor();
    await screenshot(page, 'operator-tenants');

    await page.getByRole('link', { name: 'E-mail outbox' }).click();
    const row = page.getByRole('table', { name: 'Sent e-mail' }).getByRole('row').filter({ hasText: 'owner@e2e-wind.example' });
    await row.waitFor({ timeout: 20_000 });
    await row.getByRole('button').click();
    // The operator sees that a link went out, never the link itself.
    await expect(page.getByTestId('outbox-message').textContent()).resolves.toContain('/accept-invitation?token=[hidden]');
    await screenshot(page, 'operator-outbox');
  });
});
