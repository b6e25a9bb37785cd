// The console in a real browser against the real app: demo accounts, a real worker solving with HiGHS,
// the loopback mail server. One browser, one page; each step builds on the one before.
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exampleSites } from '@gridwright/shared/examples';
import { launchBrowser, screenshot, screenshotDir, type Browser } from './browser';
import { startConsoleApp, type ConsoleApp } from './console-app';

let app: ConsoleApp;
let browser: Browser;
let page: Page;
const pageErrors: string[] = [];

const account = (role: string) => {
  const a = app.demo.accounts.find((x) => x.role === role);
  if (!a) throw new Error(`no demo ${role}`);
  return a;
};

async function signIn(role: string) {
  await browser.context.clearCookies();
  await page.goto(`${app.url}/sign-in`);
  const { email, password } = account(role);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('role').filter({ hasText: role }).waitFor();
}

/** Replaces the whole editor text the way a paste would. */
async function setEditorText(text: string) {
  await page.locator('.cm-content').click();
  await page.keyboard.press('ControlOrMeta+a');
  await page.keyboard.insertText(text);
}

/**
 * Types the opening quote of a new key after `text` — how completions pop up as one writes — and
 * waits until the list the editor offers holds every one of `fields`.
 */
async function expectCompletions(text: string, fields: string[]) {
  await setEditorText(text);
  await page.keyboard.type('"');
  const labels = page.locator('.cm-tooltip-autocomplete .cm-completionLabel');
  await expect.poll(() => labels.allTextContents(), { message: text, timeout: 15_000 }).toEqual(expect.arrayContaining(fields));
  await page.keyboard.press('Escape');
  await page.locator('.cm-tooltip-autocomplete').waitFor({ state: 'detached' });
}

describe('console in a browser', () => {
  beforeAll(async () => {
    app = await startConsoleApp();
    browser = await launchBrowser();
    page = browser.page;
    // An uncaught error in the page fails the suite here rather than as a confusing timeout later.
    page.on('pageerror', (e) => {
      pageErrors.push(e.message);
    });
  }, 120_000);

  afterAll(async () => {
    expect(pageErrors).toEqual([]);
    await browser?.close();
    await app?.close();
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

  it('completes the fields of the v1.1 site model in the spec editor, from the site-spec schema', async () => {
    await page.getByRole('link', { name: 'Workbench' }).click();
    await page.getByTestId('spec-editor').waitFor();
    // Each text ends where a new key of the object named begins; the editor offers the fields that object may have.
    const cases: [string, string[]][] = [
      ['{"units": [{"id": "g", "kind": "generator", ', ['costCurve', 'noLoadCostPerHour', 'startupCost', 'rampUpKwPerMin', 'rampDownKwPerMin', 'providesReserve', 'produces', 'consumes', 'valueCurve']],
      ['{"units": [{"initial": {', ['powerKw', 'stepsInState']],
      ['{"storage": [{', ['chargeFromSupplyOnly', 'providesReserve']],
      ['{"stores": [{', ['product', 'unit', 'capacity', 'min', 'initial', 'final', 'demandPerHour', 'inflowPerHour', 'lossPerHour', 'shortfallPenaltyPerUnit', 'spillAllowed']],
      ['{"reserve": {', ['upKw', 'shortfallPenaltyPerKwh']],
      ['{"grid": {"demandCharges": [{', ['pricePerKw', 'window', 'existingPeakKw']],
      ['{"grid": {"demandCharges": [{"window": {', ['daysOfWeek', 'from', 'to']],
      ['{"horizon": {', ['timeZone']],
    ];
    for (const [text, fields] of cases) await expectCompletions(text, fields);
  });

  // A solve on a loaded CI machine can take a while, so this step gets a longer limit than the default.
  it('checks, breaks, fixes and solves a template in the workbench, then inspects the run', async () => {
    await page.getByRole('link', { name: 'Workbench' }).click();
    // The island microgrid: gensets with cost curves, a battery and a fuel tank, spinning reserve.
    const template = exampleSites.find((e) => e.id === 'island-microgrid')!;
    await page.getByLabel('Demo site').selectOption(template.id);
    await page.getByRole('button', { name: 'Load template' }).click();
    await page.getByTestId('editor-problems').filter({ hasText: 'No problems found.' }).waitFor();

    // Each unit's price curve is drawn beside the editor and follows the text.
    const genA = page.getByTestId('unit-curves').getByRole('figure', { name: 'Price curve · gen-a' });
    await genA.getByText('Convex').waitFor();
    await genA.locator('svg.recharts-surface').first().waitFor();
    await genA.screenshot({ path: `${screenshotDir}/workbench-price-curve.png` });
    const spec = structuredClone(template.spec) as any;
    spec.units[0].costCurve[1].costPerKwh = 0.2;
    await setEditorText(JSON.stringify(spec, null, 2));
    await genA.getByText('Not convex: slice 2 is cheaper than slice 1').waitFor();

    // stepMinutes must be one of 5, 10, 15, 30, 60 (SPEC.md §1); 7 is not.
    const broken = { ...template.spec, horizon: { ...template.spec.horizon, stepMinutes: 7 } };
    await setEditorText(JSON.stringify(broken, null, 2));
    const problems = page.getByRole('list', { name: 'Problems in the spec' });
    await problems.getByText(/stepMinutes|one of 5, 10, 15, 30, 60/).first().waitFor();
    await problems.getByRole('button').first().click();
    await page.locator('.cm-lintRange-error').first().waitFor();
    await page.getByRole('button', { name: 'Check' }).click();
    await page.getByTestId('check-report').filter({ hasText: 'problem' }).waitFor();
    await expect(page.getByTestId('check-report').textContent()).resolves.toContain('/horizon/stepMinutes');
    // The API's answer lands in the editor too, beside the console's own check.
    await problems.getByRole('button').filter({ hasText: 'API' }).waitFor();
    await screenshot(page, 'workbench-error');

    await setEditorText(JSON.stringify(template.spec, null, 2));
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
    // The island's store, reserve and money, each a chart found by its name, with a legend and its unit.
    const charts = page.getByTestId('dispatch-charts');
    for (const [name, unit] of [
      ['Store level · diesel-tank (diesel)', 'L · limits 500–8,000'],
      ['Spinning reserve: required vs held', 'kW'],
      ['Where the money goes: objective terms', 'money'],
      ['Unit power and reserve held', 'kW'],
      ['State of charge · bess', 'kWh'],
    ]) {
      const figure = charts.getByRole('figure', { name });
      await figure.locator('svg.recharts-surface').first().waitFor();
      await figure.getByText(unit, { exact: false }).first().waitFor();
      // Recharts draws its legend, and the bar chart its own list, once the plot has its size.
      await figure.locator('.recharts-legend-wrapper, [aria-label="Legend"]').first().waitFor();
    }
    await charts.getByRole('figure', { name: 'Where the money goes: objective terms' }).getByText('value earned counts positive, cost negative').waitFor();
    // The prices come from a second solve after the schedule; when the island's time limit leaves it no
    // time (a loaded machine), the chart says that no price is known instead of drawing an empty plot.
    const energyValue = charts.getByRole('figure', { name: 'Marginal value of energy' });
    await energyValue.getByText('money/kWh').first().waitFor();
    await energyValue.locator('.recharts-legend-wrapper').or(energyValue.getByText('No price is known at any step')).first().waitFor();
    // Hot and cold starts per unit: gen-a has hot/cold start costs, gen-c one cost.
    const unitKpis = page.getByRole('table', { name: 'Unit KPIs' });
    await unitKpis.waitFor();
    await expect(unitKpis.getByRole('columnheader').allTextContents()).resolves.toEqual(expect.arrayContaining(['Hot', 'Cold']));
    await expect(unitKpis.getByRole('row').filter({ hasText: 'gen-c' }).textContent()).resolves.toContain('—');
    await screenshot(page, 'run-detail');
    for (const [name, shot] of [
      ['Store level · diesel-tank (diesel)', 'run-store-level'],
      ['Spinning reserve: required vs held', 'run-reserve'],
      ['Where the money goes: objective terms', 'run-objective-terms'],
      ['Marginal value of energy', 'run-marginal-value'],
    ]) {
      await charts.getByRole('figure', { name }).screenshot({ path: `${screenshotDir}/${shot}.png` });
    }

    await page.getByRole('tab', { name: 'Step table' }).click();
    const stepTable = page.getByRole('table', { name: 'Schedule', exact: true });
    await stepTable.waitFor();
    const headers = await stepTable.getByRole('columnheader').allTextContents();
    expect(headers).toEqual(expect.arrayContaining(['Reserve required kW', 'Reserve held kW', 'Value of energy money/kWh', 'gen-a reserve kW', 'diesel-tank level L']));
    await screenshot(page, 'step-table');

    await page.getByRole('tab', { name: 'Formulation report' }).click();
    const report = page.getByTestId('formulation-report');
    await report.getByRole('figure', { name: 'Coefficient ranges on a log scale' }).waitFor();
    await page.getByRole('table', { name: 'Rolling windows' }).waitFor();
    await report.getByText('Internal unit · diesel-tank').waitFor();
    await expect(report.getByLabel('Big-M kinds').textContent()).resolves.toContain('Reserve headroom');
    await screenshot(page, 'formulation-report');

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Download CSV' }).click()]);
    const csv = readFileSync((await download.path())!, 'utf8');
    const lines = csv.trim().split(/\r?\n/);
    // One header line and one line per step of the template's horizon, with the store and reserve columns.
    expect(lines.length).toBe(template.spec.horizon.steps + 1);
    expect(lines[0].split(',')).toEqual(expect.arrayContaining(['diesel-tank.level', 'site.reserveHeldKw', 'gen-a.reserveKw', 'site.marginalValuePerKwh']));

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
