// A headless Debian Chromium driven by playwright-core; never a downloaded browser.
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

export const screenshotDir = path.resolve(import.meta.dirname, '../../test-artifacts/screenshots');

export interface Browser {
  context: BrowserContext;
  page: Page;
  close(): Promise<void>;
}

export async function launchBrowser(): Promise<Browser> {
  const userDataDir = mkdtempSync(path.join(os.tmpdir(), 'gw-chromium-'));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    headless: true,
    acceptDownloads: true,
    viewport: { width: 1280, height: 860 },
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    async close() {
      await context.close();
      rmSync(userDataDir, { recursive: true, force: true });
    },
  };
}

/** `name` may name a folder too (`pages/runs-desktop`). */
export async function screenshot(page: Page, name: string) {
  const file = path.join(screenshotDir, `${name}.png`);
  mkdirSync(path.dirname(file), { recursive: true });
  await page.screenshot({ path: file, fullPage: true });
}
