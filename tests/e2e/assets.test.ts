import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, screenshot, waitUntil, WIDE } from '../helpers/browser';

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

// The technician's part (label address, checklist, deviation with a photo) is in journey-technician.test.ts.

/** Tags of the table's rows (a row's own parts carry longer test ids). */
const rowTags = (ids: string[]) => ids.filter((id) => /^asset-row-[A-Z0-9]+-[A-Z]+-\d+$/.test(id)).map((id) => id.replace('asset-row-', ''));

describe('lead on a wide screen', () => {
  it('when a lead filters the table and prints labels for a selection, then the sheet shows a label per asset', async () => {
    const page = await newPage(browser, WIDE);
    await page.goto(`${BASE_URL}/sign-in?next=${encodeURIComponent('/assets')}`);
    await page.getByTestId('sign-in-email').fill('lead@fenwater.example');
    await page.getByTestId('sign-in-password').fill('proofyard-demo');
    await page.getByTestId('sign-in-submit').click();
    await page.waitForURL(/\/assets/);
    await page.getByTestId('asset-table-header').waitFor();

    await page.getByTestId('filter-stage-Early prototype').click();
    await page.waitForURL(/stage=/);
    const rows = page.locator('[data-testid^="asset-row-"]');
    await waitUntil('only early-prototype rows show', async () => {
      const shown = rowTags(await rows.evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')!)));
      return shown.length > 0 && shown.every((t) => t.startsWith('FW3-EP-'));
    });

    const tags = rowTags(await rows.evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')!))).slice(0, 3);
    for (const tag of tags) await page.getByTestId(`asset-select-${tag}`).click();
    await screenshot(page, 'lead-assets-filtered-wide');
    await page.getByTestId('asset-print-labels').click();
    await page.waitForURL(/\/labels\?ids=/);
    await page.getByTestId('label-preview').waitFor();
    const labels = page.locator('[data-testid^="label-"][data-testid$="-tag"]');
    await waitUntil('three labels show', async () => (await labels.count()) === 3);
    const printed = await labels.allTextContents();
    expect(printed.sort()).toEqual([...tags].sort());
    await screenshot(page, 'lead-labels-wide');
    await page.context().close();
  });
});
