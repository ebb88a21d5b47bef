import type { Browser } from 'playwright-core';
import { launchBrowser, newPage, PHONE, screenshot, signIn, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { AssetList } from '../../shared/schemas/assets';

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

type Plan = { items?: Array<{ id: string; stageId: string; allocations: Array<{ assetId: string }> }>; tests?: Array<{ id: string; stageId: string; allocations: Array<{ assetId: string }> }> };

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('validation engineer at %s width', (label, viewport) => {
  it('when an engineer computes a sample size and allocates an asset to a test, then n is 22 for R 0.9 / C 0.9 and the allocation is saved', async () => {
    const token = await apiToken('engineer@fenwater.example');
    const program = await programId(token, 'FW3');
    const page = await newPage(browser, viewport);
    await signIn(page, 'engineer@fenwater.example', 'proofyard-demo', '/validation');
    await page.getByTestId('validation-plan').waitFor();

    // Success run, n = ln(1 - C) / ln(R) = ln 0.1 / ln 0.9 = 21.85, rounded up (REFERENCES.md).
    await page.getByTestId('calc-reliability').fill('0.9');
    await page.getByTestId('calc-confidence').fill('0.9');
    await waitUntil('the calculator shows 22', async () => /\b22\b/.test((await page.getByTestId('calc-n').textContent()) ?? ''));

    const plan = await apiGet<Plan>(token, `/api/validation/tests?programId=${program}`);
    const tests = plan.items ?? plan.tests ?? [];
    const test = tests[0];
    const assets = await apiGet<AssetList>(token, `/api/assets?programId=${program}&stage=${test.stageId}&limit=100`);
    const free = assets.items.find((a) => !test.allocations.some((al) => al.assetId === a.id))!;

    await page.getByTestId(`vtest-${test.id}`).first().click();
    await page.getByTestId('vtest-allocations').waitFor();
    await page.getByTestId('allocate-asset').click();
    await page.getByTestId('allocate-search').fill(free.tag);
    await page.getByTestId(`allocate-option-${free.tag}`).click();
    await page.getByTestId('allocate-submit').click();
    await page.getByTestId('allocate-notice').waitFor();
    await screenshot(page, `validation-allocated-${label}`);

    const after = await apiGet<{ allocations: Array<{ assetId: string }> }>(token, `/api/validation/tests/${test.id}`);
    expect(after.allocations.map((a) => a.assetId)).toContain(free.id);
    await page.context().close();
  });
});
