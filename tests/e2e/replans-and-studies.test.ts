// Re-plans and studies through the console in a real browser, against the real app and a worker
// solving with HiGHS. The demo developer re-plans a solved run from measured state, reads what
// changed, downloads the re-plan's CSV, then sizes the battery of the same site in a small study.
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exampleSites } from '@gridwright/shared/examples';
import { waitForRun } from '../integration/runs/run-helpers';
import { launchBrowser, screenshot, type Browser } from './browser';
import { startConsoleApp, type ConsoleApp } from './console-app';

let app: ConsoleApp;
let browser: Browser;
let page: Page;
const pageErrors: string[] = [];

// A battery and a demand charge, 96 half-hour steps, no units: it solves in well under a second.
const site = exampleSites.find((e) => e.id === 'warehouse-demand-charge')!;
const battery = site.spec.storage![0];
const REPLAN_STEP = 20;

async function apiCall(method: string, path: string, body?: unknown) {
  const res = await fetch(`${app.url}${path}`, {
    method,
    headers: { Authorization: `Bearer ${app.demo.apiKey}`, 'Content-Type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${await res.text()}`);
  return res.json();
}

async function signInAsDeveloper() {
  const developer = app.demo.accounts.find((a) => a.role === 'developer')!;
  await page.goto(`${app.url}/sign-in`);
  await page.getByLabel('E-mail').fill(developer.email);
  await page.getByLabel('Password').fill(developer.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('role').filter({ hasText: 'developer' }).waitFor();
}

describe('re-plans and studies in the console', () => {
  let parentId: string;

  beforeAll(async () => {
    app = await startConsoleApp();
    browser = await launchBrowser();
    page = browser.page;
    page.on('pageerror', (e) => {
      pageErrors.push(e.message);
    });
    const run = await apiCall('POST', '/v1/runs', site.spec);
    parentId = run.id;
    const solved = await waitForRun(app.testApp.app, app.demo.apiKey, parentId, undefined, 60_000);
    if (solved.status !== 'succeeded') throw new Error(`the parent run ended ${solved.status}`);
    await signInAsDeveloper();
  }, 120_000);

  afterAll(async () => {
    expect(pageErrors).toEqual([]);
    await browser?.close();
    await app?.close();
  });

  it('re-plans a run from a measured state of charge, shows the chain and the difference, and exports only the re-planned steps', async () => {
    await page.goto(`${app.url}/runs/${parentId}?view=revisions`);
    await page.getByText('No other revision yet').waitFor();
    await page.getByLabel('Re-plan from step').fill(String(REPLAN_STEP));
    await page.getByTestId('replan-starts-at').filter({ hasText: `${site.spec.horizon.steps - REPLAN_STEP} steps to re-plan` }).waitFor();
    const soc = page.getByLabel(`State of charge of ${battery.id} (kWh)`);
    await soc.waitFor();
    const planned = Number(await soc.inputValue());

    // More than the battery holds: the API's 400 lands beside the field, and nothing is queued.
    await soc.fill(String(battery.capacityKwh + 100));
    await page.getByRole('button', { name: 'Re-plan from this step' }).click();
    await page.locator(`input[aria-invalid="true"]`).waitFor();
    await expect(soc.getAttribute('aria-invalid')).resolves.toBe('true');
    expect((await apiCall('GET', `/v1/runs/${parentId}/revisions`)).items).toHaveLength(1);

    // The battery at its floor where the plan expected more (or full where it expected the floor): a different schedule from here on.
    const floor = battery.minSocKwh ?? 0;
    const measured = planned > floor + 1 ? floor : battery.capacityKwh;
    await soc.fill(String(measured));
    await page.getByRole('button', { name: 'Re-plan from this step' }).click();
    await page.waitForURL((url) => url.pathname.startsWith('/runs/') && !url.pathname.endsWith(parentId));
    const replanId = new URL(page.url()).pathname.split('/').pop()!;
    await page.getByTestId('revision-of').filter({ hasText: `from its step ${REPLAN_STEP}` }).waitFor();
    await page.getByTestId('run-status').filter({ hasText: 'succeeded' }).waitFor({ timeout: 60_000 });

    const chain = page.getByRole('table', { name: 'Revisions' });
    await expect(chain.getByRole('row').count()).resolves.toBe(3);
    const diff = page.getByTestId('revision-diff');
    await diff.getByText(/Setpoints: [1-9]\d* of \d+ changed/).waitFor({ timeout: 30_000 });
    await diff.getByRole('table', { name: 'Objective terms compared' }).waitFor();
    await diff.locator('svg.recharts-surface').first().waitFor();
    await page.getByText('Schedules are advisory.').first().waitFor();
    await screenshot(page, 'run-revisions');

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Download CSV' }).click()]);
    const lines = readFileSync((await download.path())!, 'utf8').trim().split(/\r?\n/);
    // One header line and one line per step from the re-plan time to the end of the parent's horizon.
    expect(lines.length).toBe(site.spec.horizon.steps - REPLAN_STEP + 1);
    const replan = await apiCall('GET', `/v1/runs/${replanId}`);
    expect(replan.revision).toMatchObject({ parentId, fromStep: REPLAN_STEP });
  }, 120_000);

  it('creates a 2-run study from a demo site, follows its progress and compares the runs', async () => {
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Studies' }).click();
    await page.getByRole('heading', { name: 'Studies' }).waitFor();
    await page.getByRole('link', { name: 'New study' }).click();
    await page.getByLabel('Demo site').selectOption(site.id);
    await page.getByRole('button', { name: 'Use this site' }).click();
    // The editor starts with the battery's capacity at its size and twice that.
    await expect(page.getByLabel('Change 1: field (JSON Pointer)').inputValue()).resolves.toBe('/storage/0/capacityKwh');
    await page.getByTestId('combination-count').filter({ hasText: '2 combinations → 2 runs' }).waitFor();

    // A pointer the spec does not have is refused, naming the change, before anything is created.
    await page.getByRole('button', { name: 'Add a change' }).click();
    await page.getByLabel('Change 2: field (JSON Pointer)').fill('/storage/3/capacityKwh');
    await page.getByLabel('Change 2: values, one per line').fill('100');
    await page.getByRole('button', { name: 'Start study (2 runs)' }).click();
    await page.getByRole('group', { name: 'Change 2' }).getByText(/\/storage/).first().waitFor();
    expect((await apiCall('GET', '/v1/studies')).items).toHaveLength(0);
    await page.getByRole('button', { name: 'Remove change 2' }).click();

    await page.getByLabel('Study name').fill('Warehouse battery size');
    await page.getByRole('button', { name: 'Start study (2 runs)' }).click();
    await page.getByRole('heading', { name: 'Warehouse battery size' }).waitFor();
    await page.getByTestId('study-progress').waitFor();
    await page.getByTestId('study-status').filter({ hasText: 'finished' }).waitFor({ timeout: 60_000 });
    await page.getByTestId('study-progress').filter({ hasText: '2 of 2 runs done' }).waitFor();

    // The comparison follows the runs until both have their figures.
    const comparison = page.getByRole('table', { name: 'Comparison' });
    await comparison.getByText(String(battery.capacityKwh * 2)).waitFor();
    await expect.poll(() => comparison.getByText('succeeded').count(), { timeout: 30_000 }).toBe(2);
    await expect(comparison.getByRole('link', { name: 'Open run' }).count()).resolves.toBe(2);
    await page.getByRole('figure', { name: 'Objective and its terms by combination' }).getByRole('application').waitFor();
    const figures = page.getByRole('figure', { name: 'Energy and equipment figures by combination' });
    await figures.getByLabel('Figure').selectOption('curtailed');
    await figures.getByText('Supply curtailed by combination').waitFor();
    await figures.getByRole('application').waitFor();
    await screenshot(page, 'study-detail');

    // The comparison's figures are the runs' own.
    const studies = await apiCall('GET', '/v1/studies');
    const study = await apiCall('GET', `/v1/studies/${studies.items[0].id}/comparison`);
    for (const row of study.rows) {
      const run = await apiCall('GET', `/v1/runs/${row.runId}`);
      expect(row.objective).toBe(run.objective.value);
    }
    await comparison.getByRole('link', { name: 'Open run' }).first().click();
    await page.getByTestId('run-status').filter({ hasText: 'succeeded' }).waitFor();
  }, 120_000);
});
