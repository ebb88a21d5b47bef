import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, signIn, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { AssetList } from '../../shared/schemas/assets';

let browser: Browser;
let photoFile: string;
beforeAll(async () => {
  browser = await launchBrowser();
  photoFile = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'proofyard-finding-photo-')), 'weep.jpg');
  await sharp({ create: { width: 2400, height: 1800, channels: 3, background: { r: 120, g: 90, b: 70 } } }).jpeg().toFile(photoFile);
});
afterAll(async () => {
  await browser?.close();
});

type FindingPage = { items: Array<{ id: string; title: string; photos: unknown[] }> };

async function findingsTitled(token: string, program: string, title: string) {
  const list = await apiGet<FindingPage>(token, `/api/findings?programId=${program}&status=active&sort=updated&dir=desc&limit=100`);
  return list.items.filter((f) => f.title === title);
}

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('findings filed offline at %s width', (label, viewport) => {
  it('when a technician files two findings (one with a photo) without a connection, then exactly two reach the server once it is back', async () => {
    const token = await apiToken('technician@fenwater.example');
    const program = await programId(token, 'FW3');
    const assets = await apiGet<AssetList>(token, `/api/assets?programId=${program}&limit=5`);
    const asset = assets.items[0];
    const stamp = `${label}-${Date.now()}`;
    const titles = [`Coolant weep at chiller union ${stamp}`, `Trim clip missing at B-pillar ${stamp}`];

    const page = await newPage(browser, viewport);
    await signIn(page, 'technician@fenwater.example', 'proofyard-demo', `/findings/new?assetId=${asset.id}`);
    await page.getByTestId('finding-capture').waitFor();
    await page.context().setOffline(true);
    await page.getByTestId('finding-capture-offline').waitFor();

    const chooser = page.waitForEvent('filechooser');
    await page.getByTestId('finding-photo-add-library').click();
    await (await chooser).setFiles(photoFile);
    await page.getByTestId('finding-photos').locator('img').first().waitFor();
    await page.getByTestId('finding-title').fill(titles[0]);
    await page.getByTestId('finding-severity-major').click();
    await page.getByTestId('finding-submit').click();
    await page.getByTestId('finding-queued').waitFor();

    await page.getByTestId('finding-title').fill(titles[1]);
    await page.getByTestId('finding-severity-minor').click();
    await page.getByTestId('finding-submit').click();
    await waitUntil('the banner counts two waiting', async () => /2 changes? waiting/.test((await page.getByTestId('offline-queue').textContent()) ?? ''));
    await screenshot(page, `findings-offline-queue-${label}`);

    await page.context().setOffline(false);
    await waitUntil(
      'both findings are on the server',
      async () => (await findingsTitled(token, program, titles[0])).length === 1 && (await findingsTitled(token, program, titles[1])).length === 1,
      30_000,
    );
    // Give any duplicate send a moment to show up, then count again: exactly one of each.
    await new Promise((r) => setTimeout(r, 1500));
    const first = await findingsTitled(token, program, titles[0]);
    expect(first).toHaveLength(1);
    expect(await findingsTitled(token, program, titles[1])).toHaveLength(1);
    await waitUntil('the photo went with the first finding', async () => {
      const detail = await apiGet<{ photos: unknown[] }>(token, `/api/findings/${first[0].id}`);
      return detail.photos.length === 1;
    }, 30_000);
    await screenshot(page, `findings-synced-${label}`);
    await page.context().close();
  });
});

describe('engineer closes a finding', () => {
  it('when an engineer verifies a fixed finding in the browser, then it shows as verified', async () => {
    const techToken = await apiToken('technician@fenwater.example');
    const program = await programId(techToken, 'FW3');
    const assets = await apiGet<AssetList>(techToken, `/api/assets?programId=${program}&limit=5`);
    const title = `Harness chafe at firewall grommet ${Date.now()}`;
    const engineerToken = await apiToken('engineer@fenwater.example');
    const me = await apiGet<{ user: { id: string } }>(engineerToken, '/api/me');
    const created = await fetch(`${BASE_URL}/api/findings`, {
      method: 'POST',
      headers: { authorization: `Bearer ${techToken}`, 'content-type': 'application/json' },
      body: JSON.stringify({ assetId: assets.items[0].id, title, severity: 'major', ownerId: me.user.id }),
    }).then((r) => r.json() as Promise<{ id: string; version: number }>);
    const fixed = await fetch(`${BASE_URL}/api/findings/${created.id}`, {
      method: 'PATCH',
      headers: { authorization: `Bearer ${engineerToken}`, 'content-type': 'application/json' },
      body: JSON.stringify({ version: created.version, status: 'fixed' }),
    });
    expect(fixed.status).toBe(200);

    const page = await newPage(browser, WIDE);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', `/findings/${created.id}`);
    await page.getByTestId('finding-action-verified').click();
    await waitUntil('the status reads verified', async () => /Verified/.test((await page.getByTestId('finding-status').textContent()) ?? ''));
    await screenshot(page, 'engineer-finding-verified-wide');
    await page.context().close();
  });
});
