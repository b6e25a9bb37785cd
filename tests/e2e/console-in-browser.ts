// What every browser test file shares: the app and one browser page for the file, the demo accounts,
// and the editor filled the way a paste would fill it.
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, expect } from 'vitest';
import { launchBrowser, type Browser } from './browser';
import { startConsoleApp, type ConsoleApp } from './console-app';

export interface ConsoleInBrowser {
  app: ConsoleApp;
  browser: Browser;
  page: Page;
}

/**
 * Starts the app and a browser before the file's tests and closes both after them. An uncaught
 * error in the page fails the file there rather than as a confusing timeout later.
 */
export function consoleInBrowser(): ConsoleInBrowser {
  const session = {} as ConsoleInBrowser;
  const pageErrors: string[] = [];
  beforeAll(async () => {
    session.app = await startConsoleApp();
    session.browser = await launchBrowser();
    session.page = session.browser.page;
    session.page.on('pageerror', (e) => {
      pageErrors.push(e.message);
    });
  }, 120_000);
  afterAll(async () => {
    expect(pageErrors).toEqual([]);
    await session.browser?.close();
    await session.app?.close();
  });
  return session;
}

export function demoAccount(app: ConsoleApp, role: string) {
  const account = app.demo.accounts.find((x) => x.role === role);
  if (!account) throw new Error(`no demo ${role}`);
  return account;
}

/** Replaces the whole editor text the way a paste would. */
export async function setEditorText(page: Page, text: string) {
  await page.locator('.cm-content').click();
  await page.keyboard.press('ControlOrMeta+a');
  await page.keyboard.insertText(text);
}
