import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, signIn, WIDE } from '../helpers/browser';

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

// Which navigation each role sees (the foundation's items; later features add theirs).
const EXPECTED_NAV: Record<string, { has: string[]; lacks: string[] }> = {
  technician: { has: ['home'], lacks: ['users', 'programs'] },
  engineer: { has: ['home'], lacks: ['users', 'programs'] },
  coordinator: { has: ['home'], lacks: ['users', 'programs'] },
  driver: { has: ['home'], lacks: ['users', 'programs'] },
  lead: { has: ['home'], lacks: ['users', 'programs'] },
  admin: { has: ['home', 'users', 'programs'], lacks: [] },
};

describe.each([
  ['phone', PHONE, 'shell-phone'],
  ['wide', WIDE, 'shell-wide'],
])('at %s width', (label, viewport, shellId) => {
  it.each(Object.keys(EXPECTED_NAV))('when a %s signs in, then home shows who they are and the right navigation', async (role) => {
    const page = await newPage(browser, viewport);
    await signIn(page, `${role}@fenwater.example`);
    await page.getByTestId('home-user-name').waitFor();
    await page.getByTestId(shellId).waitFor();
    await expect(page.getByTestId('home-role').textContent()).resolves.toBeTruthy();
    await expect(page.getByText('Fenwater Motors FW3').first().isVisible()).resolves.toBe(true);
    for (const item of EXPECTED_NAV[role].has) {
      await expect(page.getByTestId(`nav-${item}`).first().isVisible()).resolves.toBe(true);
    }
    for (const item of EXPECTED_NAV[role].lacks) {
      await expect(page.getByTestId(`nav-${item}`).count()).resolves.toBe(0);
    }
    await screenshot(page, `shell-${role}-${label}`);
    await page.context().close();
  });

  it('when the password is wrong, then a plain error sentence shows', async () => {
    const page = await newPage(browser, viewport);
    await signIn(page, 'lead@fenwater.example', 'not-the-password');
    const error = page.getByTestId('sign-in-error');
    await error.waitFor();
    await expect(error.textContent()).resolves.toContain('That e-mail and password do not match an account.');
    await screenshot(page, `sign-in-error-${label}`);
    await page.context().close();
  });
});

describe('program scoping in the browser', () => {
  it('when a Marram technician signs in, then only the M1 program is shown', async () => {
    const page = await newPage(browser, WIDE);
    await signIn(page, 'technician@marram.example');
    await page.getByTestId('home-user-name').waitFor();
    await expect(page.getByText('Marram Works M1').first().isVisible()).resolves.toBe(true);
    await expect(page.getByText('Fenwater Motors FW3').count()).resolves.toBe(0);
    await page.context().close();
  });

  it('when a page is opened without a session, then sign-in comes first and leads back to it', async () => {
    const page = await newPage(browser, PHONE);
    await page.goto(`${BASE_URL}/admin/users`);
    await page.waitForURL(/\/sign-in/);
    await page.getByTestId('sign-in-email').fill('admin@fenwater.example');
    await page.getByTestId('sign-in-password').fill('proofyard-demo');
    await page.getByTestId('sign-in-submit').click();
    await page.waitForURL(/\/admin\/users/);
    await page.getByTestId('invite-email').waitFor();
    await page.context().close();
  });
});
