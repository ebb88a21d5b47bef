import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, signIn, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { AssetList } from '../../shared/schemas/assets';

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

// Filing findings offline (two, one with a photo, each arriving exactly once) is part of
// journey-technician.test.ts, at both widths.

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
] as const)('engineer closes a finding at %s width', (label, viewport) => {
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

    const page = await newPage(browser, viewport);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', `/findings/${created.id}`);
    await page.getByTestId('finding-action-verified').click();
    await waitUntil('the status reads verified', async () => /Verified/.test((await page.getByTestId('finding-status').textContent()) ?? ''));
    await screenshot(page, `engineer-finding-verified-${label}`);
    await page.context().close();
  });
});
