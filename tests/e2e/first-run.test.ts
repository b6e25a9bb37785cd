// The first run of a new user, in a real browser against the real app and worker: the owner of the
// demo tenant takes a SCADA export of 48 hourly rows (solar availability and site load, invented in
// fixtures/first-run-site.csv) to a solved run, its charts, a CSV export and a code snippet, and the
// actions it takes are counted. Then every page of the console is photographed at desktop and tablet
// width, and the fixes around that path are checked where a person meets them.
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { exampleSites } from '@gridwright/shared/examples';
import { ActionCounter } from './actions';
import { screenshot, type Browser } from './browser';
import type { ConsoleApp } from './console-app';
import { consoleInBrowser, demoAccount, setEditorText } from './console-in-browser';

const FIXTURE = path.resolve(import.meta.dirname, 'fixtures/first-run-site.csv');
const ARTIFACTS = path.resolve(import.meta.dirname, '../../test-artifacts');
const WIDTHS = { desktop: { width: 1440, height: 900 }, tablet: { width: 820, height: 1180 } } as const;
/** The target for the whole first run. */
const MAX_ACTIONS = 12;

let app: ConsoleApp;
let browser: Browser;
let page: Page;
let runId = '';

async function signIn(role: string) {
  const { email, password } = demoAccount(app, role);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('role').filter({ hasText: role }).waitFor();
}

async function signOut() {
  await page.getByRole('button', { name: 'Sign out' }).click();
  await page.getByRole('button', { name: 'Sign in' }).waitFor();
}

/** Waits until nothing on the page says it is loading, so a screenshot shows the page, not a spinner. */
async function settled() {
  await expect.poll(() => page.getByRole('status').filter({ hasText: /Loading|Opening/ }).count(), { timeout: 20_000 }).toBe(0);
}

describe('first run: from a SCADA export to a solved run', () => {
  const session = consoleInBrowser();
  beforeAll(() => {
    ({ app, browser, page } = session);
  });

  it(`takes the owner of the demo tenant from sign-in to a solved run, its charts, a CSV export and a code snippet in at most ${MAX_ACTIONS} actions`, async () => {
    const started = performance.now();
    const act = new ActionCounter();
    await page.setViewportSize(WIDTHS.desktop);
    await page.goto(`${app.url}/`);
    const { email, password } = demoAccount(app, 'owner');
    await act.type(page.getByLabel('E-mail'), email, 'e-mail');
    await act.type(page.getByLabel('Password'), password, 'password');
    await act.click(page.getByRole('button', { name: 'Sign in' }), 'Sign in');
    await act.click(page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Workbench' }), 'Workbench');

    await act.upload(page.getByLabel(/SCADA CSV export/), FIXTURE, 'the CSV export');
    // The file sets the horizon, and each column's role comes preselected from its header.
    const roles = page.getByTestId('csv-roles');
    await roles.getByTestId('csv-horizon').filter({ hasText: '48 steps of 60 min' }).waitFor();
    await expect(roles.getByTestId('csv-horizon').textContent()).resolves.toContain('Europe/Lisbon');
    await expect(roles.getByLabel('solar [kW] · kW').inputValue()).resolves.toBe('supply');
    await expect(roles.getByLabel('site load [kW] · kW').inputValue()).resolves.toBe('siteLoad');
    await act.click(roles.getByRole('button', { name: 'Build spec from the file' }), 'Build spec from the file');
    await page.locator('.cm-content').filter({ hasText: '"seriesId": "ser_' }).waitFor();
    await expect(page.locator('.cm-content').textContent()).resolves.toContain('"timeZone": "Europe/Lisbon"');
    await page.getByTestId('editor-problems').filter({ hasText: 'No problems found.' }).waitFor();

    await act.click(page.getByRole('button', { name: 'Solve', exact: true }), 'Solve');
    await page.getByTestId('followed-run').getByText('succeeded').waitFor({ timeout: 120_000 });
    await act.click(page.getByRole('link', { name: 'Open run' }), 'Open run');
    runId = page.url().split('/runs/')[1].split('?')[0];

    const charts = page.getByTestId('dispatch-charts');
    await charts.locator('svg.recharts-surface').first().waitFor();
    await charts.getByRole('figure', { name: /Supply/ }).locator('.recharts-legend-wrapper').getByText('Available').waitFor();
    await page.getByText('Schedules are advisory.').first().waitFor();
    await screenshot(page, 'first-run-dispatch');

    const [download] = await Promise.all([page.waitForEvent('download'), act.click(page.getByRole('button', { name: 'Download CSV' }), 'Download CSV')]);
    const csv = readFileSync((await download.path())!, 'utf8').trim().split(/\r?\n/);
    // A header and one line per hour of the file.
    expect(csv).toHaveLength(49);

    await act.click(page.getByRole('tab', { name: 'Call from code' }), 'Call from code');
    const snippet = page.getByTestId('code-snippet');
    await expect(snippet.getByLabel('Code').textContent()).resolves.toContain("curl -sS -X POST");
    await act.click(snippet.getByRole('radio', { name: 'Python requests' }), 'Python requests');
    const python = (await snippet.getByLabel('Code').textContent()) ?? '';
    // The exact spec of this run: its supply is the uploaded series.
    const submitted = await page.evaluate(async (id) => (await fetch(`/v1/runs/${id}/spec`)).json(), runId);
    expect(python).toContain('requests.post(');
    expect(python).toContain(`"seriesId": "${submitted.supply.seriesId}"`);

    const seconds = (performance.now() - started) / 1000;
    mkdirSync(ARTIFACTS, { recursive: true });
    writeFileSync(path.join(ARTIFACTS, 'first-run.json'), `${JSON.stringify({ actions: act.count, log: act.log, seconds: Math.round(seconds * 10) / 10 }, null, 2)}\n`);
    expect(act.log).toHaveLength(act.count);
    expect(act.count, act.log.join('\n')).toBeLessThanOrEqual(MAX_ACTIONS);
  }, 240_000);

  it('lines each column of the step table up under its header, at both widths', async () => {
    for (const [width, size] of Object.entries(WIDTHS)) {
      await page.setViewportSize(size);
      await page.goto(`${app.url}/runs/${runId}?view=schedule`);
      const table = page.getByRole('table', { name: 'Schedule' });
      await table.getByRole('row').nth(1).waitFor();
      const edges = await table.evaluate((el) => {
        const [header, first] = Array.from(el.querySelectorAll('[role="row"]'));
        const lefts = (row: Element) => Array.from(row.children).map((c) => Math.round(c.getBoundingClientRect().left));
        return { header: lefts(header), first: lefts(first) };
      });
      expect(edges.header.length, width).toBeGreaterThan(5);
      expect(edges.first, width).toEqual(edges.header);
    }
  });

  it('lists the run with its net value and the sign explained', async () => {
    await page.setViewportSize(WIDTHS.desktop);
    await page.goto(`${app.url}/runs`);
    const row = page.getByRole('table', { name: 'Runs' }).getByRole('row').filter({ has: page.locator(`a[href="/runs/${runId}"]`) });
    await row.waitFor();
    const run = await page.evaluate(async (id) => (await fetch(`/v1/runs/${id}`)).json(), runId);
    const shown = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 2, signDisplay: 'exceptZero' }).format(run.objective.value);
    await expect(row.textContent()).resolves.toContain(shown);
    await expect(page.getByTestId('net-value-note').textContent()).resolves.toMatch(/positive is a net value, negative a net cost/);
  });

  it("reuses an earlier upload and, when asked, keeps the spec's own horizon and takes the file's values for its steps", async () => {
    await page.goto(`${app.url}/workbench`);
    const island = exampleSites[0].spec;
    // A day of the file, from 06:00 local time: the file's values for steps 6 to 29.
    const horizon = { start: '2027-06-01T06:00:00+01:00', stepMinutes: 60, steps: 24, timeZone: 'Europe/Lisbon' };
    await setEditorText(page, JSON.stringify({ ...island, horizon }, null, 2));
    await page.getByRole('list', { name: 'Uploaded series' }).getByRole('listitem').filter({ hasText: 'first-run-site' }).getByRole('button', { name: 'Use' }).click();
    const roles = page.getByTestId('csv-roles');
    await roles.getByLabel("Set the spec's horizon from the file").uncheck();
    await roles.getByRole('button', { name: 'Build spec from the file' }).click();
    // The editor shows only the lines in view, so the built spec is read from the draft it keeps.
    const draft = () => page.evaluate(() => JSON.parse(localStorage.getItem('gridwright.workbench.draft') ?? 'null'));
    await expect.poll(async () => (await draft())?.supply?.seriesId ?? '').toMatch(/^ser_/);
    const built = await draft();
    expect(built.horizon).toEqual(horizon);
    // fixtures/first-run-site.csv: site load at 06:00 is 207.4 kW, at 05:00 the next day 188.1 kW.
    const fixtureLoad = readFileSync(FIXTURE, 'utf8').trim().split('\n').slice(1).map((line) => Number(line.split(';')[2].replace(',', '.')));
    expect(built.siteLoad.kw).toEqual(fixtureLoad.slice(6, 30));
    expect(built.siteLoad.kw[0]).toBe(207.4);
    expect(built.siteLoad.kw.at(-1)).toBe(188.1);
  });

  it('lists each problem once, clears the list when the spec is fixed, and asks before solving a site the check proves infeasible', async () => {
    await page.goto(`${app.url}/workbench`);
    const template = exampleSites.find((e) => e.id === 'grid-electrolyser')!;
    await page.getByLabel('Demo site').selectOption(template.id);
    await page.getByRole('button', { name: 'Load template' }).click();
    await page.getByTestId('editor-problems').filter({ hasText: 'No problems found.' }).waitFor();
    const setText = (value: unknown) => setEditorText(page, JSON.stringify(value, null, 2));
    const problems = page.getByRole('list', { name: 'Problems in the spec' });

    // One problem found by the console's own check, by Check and by the refused Solve: listed once.
    await setText({ ...template.spec, horizon: { ...template.spec.horizon, stepMinutes: 7 } });
    await problems.getByText(/one of 5, 10, 15, 30, 60/).waitFor();
    await page.getByRole('button', { name: 'Check' }).click();
    await problems.getByRole('button').filter({ hasText: 'site spec · API' }).waitFor();
    await expect(problems.getByRole('button').count()).resolves.toBe(1);
    await expect(page.getByTestId('editor-problems').textContent()).resolves.toMatch(/^1 problem marked/);
    await page.getByRole('button', { name: 'Solve', exact: true }).click();
    await expect(problems.getByRole('button').count()).resolves.toBe(1);
    await expect(page.getByRole('alert').count()).resolves.toBe(0);
    await setText(template.spec);
    await page.getByTestId('editor-problems').filter({ hasText: 'No problems found.' }).waitFor();
    await expect(problems.count()).resolves.toBe(0);

    // A hard load above everything that can serve it: valid, but the check proves there is no schedule.
    const hardLoad = { ...template.spec, siteLoad: { kw: template.spec.siteLoad!.kw.map(() => 50_000) } };
    await setText(hardLoad);
    await page.getByTestId('editor-problems').filter({ hasText: 'No problems found.' }).waitFor();
    await page.getByRole('button', { name: 'Solve', exact: true }).click();
    const ask = page.getByRole('alertdialog', { name: 'Solve a site with no schedule?' });
    await ask.waitFor();
    // Marked in the editor: the list entry jumps to the field, underlined as a warning.
    await problems.getByRole('button').filter({ hasText: /no schedule as it stands/ }).first().click();
    await page.locator('.cm-lintRange-warning').first().waitFor();
    await expect(page.getByTestId('check-report').textContent()).resolves.toContain('prove');
    await screenshot(page, 'workbench-infeasible-warning');
    await ask.getByRole('button', { name: 'Cancel' }).click();
    await expect(ask.count()).resolves.toBe(0);
    await expect(page.getByTestId('followed-run').count()).resolves.toBe(0);
  });

  it('returns nobody to a page after signing out, nor another role to the page a session ended on; operators see the plans', async () => {
    await page.goto(`${app.url}/runs/${runId}`);
    await page.getByTestId('run-status').waitFor();
    await signOut();
    await signIn('operator');
    await page.getByRole('heading', { name: 'Tenants' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/operator/tenants');
    // GET /v1/plans answers an operator who has chosen no tenant, so the plan picker has its plans.
    const planOptions = page.getByRole('form', { name: 'Create a tenant' }).getByLabel('Plan').locator('option');
    await expect.poll(() => planOptions.allTextContents()).toEqual(expect.arrayContaining([expect.stringMatching(/Pilot/), expect.stringMatching(/Field/), expect.stringMatching(/Fleet/)]));
    await signOut();

    // A session that ends under a page (here: its cookies are gone) brings the same owner back to it…
    await signIn('owner');
    await page.goto(`${app.url}/runs/${runId}`);
    await page.getByTestId('run-status').waitFor();
    await browser.context.clearCookies();
    await page.reload();
    await page.getByRole('button', { name: 'Sign in' }).waitFor();
    await signIn('owner');
    await page.getByTestId('run-status').waitFor();
    expect(new URL(page.url()).pathname).toBe(`/runs/${runId}`);
    // …and anyone else to the start.
    await browser.context.clearCookies();
    await page.reload();
    await page.getByRole('button', { name: 'Sign in' }).waitFor();
    await signIn('viewer');
    await page.getByRole('heading', { name: 'Runs' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/runs');
    await signOut();
  });

  it('links to the API reference from the shell', async () => {
    await signIn('developer');
    const link = page.getByRole('link', { name: /API reference/ });
    await expect(link.getAttribute('href')).resolves.toBe('/docs');
    const docs = await page.request.get(`${app.url}/docs/`);
    expect(docs.status()).toBe(200);
    await signOut();
  });

  it('photographs every page at desktop (1440 px) and tablet (820 px) width', async () => {
    const pages: { role: string | null; name: string; path: string; ready: () => Promise<unknown> }[] = [
      { role: null, name: 'sign-in', path: '/sign-in', ready: () => page.getByRole('button', { name: 'Sign in' }).waitFor() },
      { role: null, name: 'forgot-password', path: '/forgot-password', ready: () => page.getByRole('heading').first().waitFor() },
      { role: null, name: 'reset-password', path: '/reset-password?token=none', ready: () => page.getByRole('heading').first().waitFor() },
      { role: null, name: 'accept-invitation', path: '/accept-invitation?token=none', ready: () => page.getByRole('heading').first().waitFor() },
      { role: 'owner', name: 'runs', path: '/runs', ready: () => page.getByRole('table', { name: 'Runs' }).waitFor() },
      { role: 'owner', name: 'run-dispatch', path: `/runs/${runId}`, ready: () => page.getByTestId('dispatch-charts').locator('svg.recharts-surface').first().waitFor() },
      { role: 'owner', name: 'run-step-table', path: `/runs/${runId}?view=schedule`, ready: () => page.getByRole('table', { name: 'Schedule' }).getByRole('row').nth(1).waitFor() },
      { role: 'owner', name: 'run-formulation', path: `/runs/${runId}?view=formulation`, ready: () => page.getByTestId('formulation-report').waitFor() },
      { role: 'owner', name: 'run-spec', path: `/runs/${runId}?view=spec`, ready: () => page.locator('.cm-content').first().waitFor() },
      { role: 'owner', name: 'run-code', path: `/runs/${runId}?view=code`, ready: () => page.getByTestId('code-snippet').waitFor() },
      { role: 'owner', name: 'run-deliveries', path: `/runs/${runId}?view=deliveries`, ready: () => settled() },
      { role: 'owner', name: 'workbench', path: '/workbench', ready: () => page.getByTestId('spec-editor').waitFor() },
      { role: 'owner', name: 'keys', path: '/keys', ready: () => page.getByRole('heading', { name: 'API keys' }).waitFor() },
      { role: 'owner', name: 'webhooks', path: '/webhooks', ready: () => page.getByRole('heading', { name: 'Webhooks' }).waitFor() },
      { role: 'owner', name: 'export-profiles', path: '/export-profiles', ready: () => page.getByRole('heading', { name: 'CSV export profiles' }).waitFor() },
      { role: 'owner', name: 'usage', path: '/usage', ready: () => page.getByTestId('usage-charts').locator('svg.recharts-surface').first().waitFor() },
      { role: 'owner', name: 'billing', path: '/billing', ready: () => page.getByRole('heading', { name: 'Billing' }).waitFor() },
      { role: 'owner', name: 'team', path: '/team', ready: () => page.getByRole('heading', { name: 'Team' }).waitFor() },
      { role: 'owner', name: 'activity', path: '/activity', ready: () => page.getByRole('heading').first().waitFor() },
      { role: 'owner', name: 'account', path: '/account', ready: () => page.getByRole('heading').first().waitFor() },
      { role: 'owner', name: 'not-found', path: '/no-such-page', ready: () => page.getByText('No page here').waitFor() },
      { role: 'operator', name: 'operator-tenants', path: '/operator/tenants', ready: () => page.getByRole('table', { name: 'Tenants' }).waitFor() },
      { role: 'operator', name: 'operator-tenant-detail', path: `/operator/tenants/${app.demo.tenantId}`, ready: () => page.getByRole('heading').first().waitFor() },
      { role: 'operator', name: 'operator-outbox', path: '/operator/outbox', ready: () => page.getByRole('heading').first().waitFor() },
      { role: 'operator', name: 'operator-audit', path: '/operator/audit', ready: () => page.getByRole('heading').first().waitFor() },
    ];
    let signedIn: string | null = null;
    for (const p of pages) {
      if (p.role !== signedIn) {
        await browser.context.clearCookies();
        if (p.role) {
          await page.goto(`${app.url}/sign-in`);
          await signIn(p.role);
        }
        signedIn = p.role;
      }
      for (const [width, size] of Object.entries(WIDTHS)) {
        await page.setViewportSize(size);
        await page.goto(`${app.url}${p.path}`);
        await p.ready();
        await settled();
        await screenshot(page, `pages/${p.name}-${width}`);
      }
    }
  }, 240_000);
});
