import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { AssetList, AssetSummary, Checklist } from '../../shared/schemas/assets';

// The technician's day in one journey, from the asset's label to a finding synced after a dead
// spot: open the asset from the address its QR label holds (signed out, so through sign-in),
// work the checklist (two items passed, one deviation with a photo), then lose the connection,
// file two findings (one with a photo) on the device, get the connection back and see both on
// the server, exactly once, and in the app.

let browser: Browser;
let photoDir: string;
let checklistPhoto: string;
let findingPhoto: string;
const usedAssets = new Set<string>();

beforeAll(async () => {
  browser = await launchBrowser();
  photoDir = fs.mkdtempSync(path.join(os.tmpdir(), 'proofyard-journey-'));
  // A phone-sized camera picture (4000 x 3000) that the app must shrink before upload.
  checklistPhoto = path.join(photoDir, 'harness.jpg');
  await sharp({ create: { width: 4000, height: 3000, channels: 3, background: { r: 90, g: 110, b: 100 } } })
    .jpeg({ quality: 90 })
    .toFile(checklistPhoto);
  findingPhoto = path.join(photoDir, 'weep.jpg');
  await sharp({ create: { width: 2400, height: 1800, channels: 3, background: { r: 120, g: 90, b: 70 } } }).jpeg().toFile(findingPhoto);
});
afterAll(async () => {
  await browser?.close();
});

/** An asset with at least three open checklist items that no other run of this file has used. */
async function assetWithOpenItems(token: string, program: string): Promise<AssetSummary> {
  const list = await apiGet<AssetList>(token, `/api/assets?programId=${program}&limit=100`);
  const asset = list.items.find((a) => !usedAssets.has(a.id) && a.checklist.total - a.checklist.done - a.checklist.deviations >= 3);
  if (!asset) throw new Error('no demo asset with three open items');
  usedAssets.add(asset.id);
  return asset;
}

type FindingPage = { items: Array<{ id: string; title: string }> };

async function findingsTitled(token: string, program: string, title: string) {
  const list = await apiGet<FindingPage>(token, `/api/findings?programId=${program}&status=active&sort=updated&dir=desc&limit=100`);
  return list.items.filter((f) => f.title === title);
}

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('technician journey at %s width', (label, viewport) => {
  it('when a technician opens an asset from its label, works its checklist and files findings without a connection, then everything reaches the server once and shows in the app', async () => {
    const token = await apiToken('technician@fenwater.example');
    const program = await programId(token, 'FW3');
    const asset = await assetWithOpenItems(token, program);
    const page = await newPage(browser, viewport);

    // 1. The label's QR code holds the asset's address; opened signed out, it goes through sign-in and back.
    await page.goto(`${BASE_URL}/assets/${asset.id}`);
    await page.waitForURL(/\/sign-in/);
    await page.getByTestId('sign-in-email').fill('technician@fenwater.example');
    await page.getByTestId('sign-in-password').fill('proofyard-demo');
    await page.getByTestId('sign-in-submit').click();
    await page.waitForURL(new RegExp(`/assets/${asset.id}$`));
    await expect(page.getByTestId('asset-tag').textContent()).resolves.toContain(asset.tag);

    // 2. The checklist: two items passed, one deviation with a photo (it files a finding of its own).
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
    const itemChooser = page.waitForEvent('filechooser');
    await page.getByTestId(`item-${deviating.id}-add-photo-library`).click();
    await (await itemChooser).setFiles(checklistPhoto);
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
    await screenshot(page, `journey-technician-checklist-${label}`);

    // 3. Back on the asset, the connection drops; two findings are filed on the device.
    await page.getByTestId('checklist-back').click();
    await page.getByTestId('asset-findings').waitFor();
    await page.context().setOffline(true);
    await page.getByTestId('asset-file-finding').click();
    await page.getByTestId('finding-capture').waitFor();
    await page.getByTestId('finding-capture-offline').waitFor();

    const stamp = `${label}-${Date.now()}`;
    const titles = [`Coolant weep at chiller union ${stamp}`, `Trim clip missing at B-pillar ${stamp}`];
    const chooser = page.waitForEvent('filechooser');
    await page.getByTestId('finding-photo-add-library').click();
    await (await chooser).setFiles(findingPhoto);
    await page.getByTestId('finding-photos').locator('img').first().waitFor();
    await page.getByTestId('finding-title').fill(titles[0]);
    await page.getByTestId('finding-severity-major').click();
    await page.getByTestId('finding-submit').click();
    await page.getByTestId('finding-queued').waitFor();

    await page.getByTestId('finding-title').fill(titles[1]);
    await page.getByTestId('finding-severity-minor').click();
    await page.getByTestId('finding-submit').click();
    await waitUntil('the banner counts two waiting', async () => /2 changes? waiting/.test((await page.getByTestId('offline-queue').textContent()) ?? ''));
    await screenshot(page, `journey-technician-offline-${label}`);

    // 4. The connection is back: the queue empties and each finding is on the server exactly once.
    await page.context().setOffline(false);
    await waitUntil('the offline banner is gone', async () => (await page.getByTestId('offline-queue').count()) === 0, 30_000);
    await waitUntil(
      'both findings are on the server',
      async () => (await findingsTitled(token, program, titles[0])).length === 1 && (await findingsTitled(token, program, titles[1])).length === 1,
      30_000,
    );
    // Give any duplicate send a moment to show up, then count again: exactly one of each.
    await new Promise((r) => setTimeout(r, 1500));
    const [first] = await findingsTitled(token, program, titles[0]);
    expect(await findingsTitled(token, program, titles[0])).toHaveLength(1);
    const [second] = await findingsTitled(token, program, titles[1]);
    expect(await findingsTitled(token, program, titles[1])).toHaveLength(1);
    await waitUntil(
      'the photo went with the first finding',
      async () => (await apiGet<{ photos: unknown[] }>(token, `/api/findings/${first.id}`)).photos.length === 1,
      30_000,
    );

    // 5. And the app shows them: the asset's findings, newest first, then the first one with its photo.
    await page.goto(`${BASE_URL}/findings?assetId=${asset.id}&sort=newest`);
    await page.getByTestId(`finding-row-${first.id}`).waitFor();
    await page.getByTestId(`finding-row-${second.id}`).waitFor();
    await screenshot(page, `journey-technician-synced-list-${label}`);
    await page.goto(`${BASE_URL}/findings/${first.id}`);
    await page.getByTestId('finding-photo-grid').locator('img').first().waitFor({ timeout: 30_000 });
    await expect(page.getByTestId('finding-status').textContent()).resolves.toBeTruthy();
    await screenshot(page, `journey-technician-done-${label}`);
    await page.context().close();
  }, 180_000);
});
