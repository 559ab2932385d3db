// Debian's Chromium driven by playwright-core: no browser download, no outside network. Playwright gives
// each launch a fresh temporary profile of its own.
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, inject } from 'vitest';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';

export const PHONE = { width: 390, height: 844 } as const;
export const DESKTOP = { width: 1280, height: 800 } as const;
export const SCREENSHOT_DIR = path.resolve(new URL('..', import.meta.url).pathname, 'screenshots');

/** The base URL of the app the e2e global setup started. */
export function baseUrl(): string {
  return inject('baseUrl');
}

/** Launches headless Chromium with the flags this machine needs. */
export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--disable-dev-shm-usage',
    ],
  });
}

/**
 * One headless Chromium for the describe block it is called in: launched before its tests, closed after them.
 * Returns a getter, since the browser exists only once the block's tests start.
 */
export function useBrowser(): () => Browser {
  let browser: Browser | undefined;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });
  return () => {
    if (!browser) throw new Error('the browser is launched before the tests of its describe block');
    return browser;
  };
}

/** A fresh context (own cookies) at a viewport size, with the base URL set. */
export async function newContext(
  browser: Browser,
  viewport: { width: number; height: number } = PHONE,
): Promise<BrowserContext> {
  return browser.newContext({ viewport, baseURL: baseUrl(), deviceScaleFactor: 1 });
}

/** Saves a full-page screenshot under tests/e2e/screenshots/ (git-ignored) and returns its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const file = path.join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    databaseUrl: string;
    smtpPort: number;
    /** The e2e server's object store (S3 API), where its photos live. */
    s3Endpoint: string;
  }
}

/** Opens the folded phone menu when it is shown (below the sm breakpoint), so nav links can be clicked. */
export async function openMenuIfFolded(page: Page): Promise<void> {
  const summary = page.locator('header details > summary');
  if (await summary.isVisible()) {
    const open = await page.locator('header details').evaluate((d) => (d as HTMLDetailsElement).open);
    if (!open) await summary.click();
  }
}
