import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { AssetList, Checklist } from '../../shared/schemas/assets';

let browser: Browser;
let photoFile: string;
beforeAll(async () => {
  browser = await launchBrowser();
  // A phone-sized camera picture (4000 x 3000) that the app must shrink before upload.
  photoFile = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'proofyard-photo-')), 'harness.jpg');
  await sharp({ create: { width: 4000, height: 3000, channels: 3, background: { r: 90, g: 110, b: 100 } } })
    .jpeg({ quality: 90 })
    .toFile(photoFile);
});
afterAll(async () => {
  await browser?.close();
});

async function assetWithOpenItems(token: string) {
  const program = await programId(token, 'FW3');
  const list = await apiGet<AssetList>(token, `/api/assets?programId=${program}&limit=100`);
  for (const asset of list.items) {
    if (asset.checklist.total - asset.checklist.done - asset.checklist.deviations >= 3) return asset;
  }
  throw new Error('no demo asset with three open items');
}

describe('technician on a phone', () => {
  it('when a technician opens an asset from its label address, then ticks items and files a deviation with a photo, the progress moves', async () => {
    const token = await apiToken('technician@fenwater.example');
    const asset = await assetWithOpenItems(token);
    const page = await newPage(browser, PHONE);

    // The label's QR code holds the asset's address; opening it signed out goes through sign-in.
    await page.goto(`${BASE_URL}/assets/${asset.id}`);
    await page.waitForURL(/\/sign-in/);
    await page.getByTestId('sign-in-email').fill('technician@fenwater.example');
    await page.getByTestId('sign-in-password').fill('proofyard-demo');
    await page.getByTestId('sign-in-submit').click();
    await page.waitForURL(new RegExp(`/assets/${asset.id}$`));
    await expect(page.getByTestId('asset-tag').textContent()).resolves.toContain(asset.tag);

    await page.getByTestId('asset-checklist-link').click();
    await page.waitForURL(/\/checklist/);
    const progress = page.getByTestId('checklist-progress');
    await progress.waitFor();
    const before = await progress.textContent();

    const checklist = await apiGet<Checklist>(token, `/api/assets/${asset.id}/checklist`);
    const open = checklist.groups.flatMap((g) => g.items).filter((i) => i.state === 'open');
    for (const item of open.slice(0, 2)) {
      await page.getByTestId(`item-${item.id}-passed`).click();
      await page.getByTestId(`item-${item.id}-state`).filter({ hasText: 'Passed' }).waitFor();
    }

    const deviating = open[2];
    await page.getByTestId(`item-${deviating.id}-deviation`).click();
    await page.getByTestId('deviation-description').fill('Connector not fully seated; latch broken');
    await page.getByTestId('deviation-submit').click();
    await page.getByTestId(`item-${deviating.id}-finding`).waitFor();

    await page.getByTestId(`item-${deviating.id}-details-toggle`).click();
    const chooser = page.waitForEvent('filechooser');
    await page.getByTestId(`item-${deviating.id}-add-photo-library`).click();
    await (await chooser).setFiles(photoFile);
    await page.getByTestId(`item-${deviating.id}-photos`).locator('img').first().waitFor({ timeout: 30_000 });

    await waitUntil('the progress changes', async () => (await progress.textContent()) !== before);
    const after = await apiGet<Checklist>(token, `/api/assets/${asset.id}/checklist`);
    const item = after.groups.flatMap((g) => g.items).find((i) => i.id === deviating.id)!;
    expect(item.state).toBe('deviation');
    expect(item.findingId).toEqual(expect.any(String));
    expect(item.photos).toHaveLength(1);
    // Resized on the device before upload: the long side is about 1600 px, not the camera's 4000.
    expect(Math.max(item.photos[0].width ?? 0, item.photos[0].height ?? 0)).toBeLessThanOrEqual(1600);
    expect(after.progress.done).toBe(checklist.progress.done + 2);
    await screenshot(page, 'technician-checklist-phone');
    await page.context().close();
  });
});

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
