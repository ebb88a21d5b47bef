import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';

export const BASE_URL = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:8080';
export const ARTIFACTS = process.env.TEST_ARTIFACTS ?? path.resolve('test-artifacts');
export const PHONE = { width: 390, height: 844 };
export const WIDE = { width: 1280, height: 860 };

/** Debian's Chromium, headless, with the flags that keep it off the closed network (Playwright gives each launch a fresh profile). */
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
 * A page in a fresh context. `bypassCSP` lets a test inject a script tag of its own (the
 * accessibility scan's axe-core) past the app's `script-src 'self'`.
 */
export async function newPage(browser: Browser, viewport: { width: number; height: number }, opts: { bypassCSP?: boolean } = {}): Promise<Page> {
  const context = await browser.newContext({ viewport, deviceScaleFactor: 1, bypassCSP: opts.bypassCSP ?? false });
  const page = await context.newPage();
  page.setDefaultTimeout(15_000);
  return page;
}

export async function screenshot(page: Page, name: string) {
  fs.mkdirSync(ARTIFACTS, { recursive: true });
  await page.screenshot({ path: path.join(ARTIFACTS, `${name}.png`), fullPage: false });
}

export async function signIn(page: Page, email: string, password = 'proofyard-demo', next?: string) {
  await page.goto(`${BASE_URL}/sign-in${next ? `?next=${encodeURIComponent(next)}` : ''}`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(password);
  await page.getByTestId('sign-in-submit').click();
}

/** Polls `check` until it returns true (jest has no expect.poll); fails with `what` after the timeout. */
export async function waitUntil(what: string, check: () => Promise<boolean>, timeoutMs = 10_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check().catch(() => false)) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`timed out waiting until ${what}`);
}
