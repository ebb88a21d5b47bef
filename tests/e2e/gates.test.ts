import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, signIn, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { ProgramReadiness } from '../../shared/schemas/readiness';

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

type Mail = { to: string; subject: string; text: string };

async function mailLinking(path: string): Promise<Mail | undefined> {
  const res = await fetch(`${BASE_URL}/api/dev/mail`);
  const { messages } = (await res.json()) as { messages: Mail[] };
  return messages.find((m) => m.text.includes(path));
}

/** A calendar day a week from now, YYYY-MM-DD (UTC, as the server counts due dates). */
function weekAhead(): string {
  return new Date(Date.now() + 7 * 86_400_000).toISOString().slice(0, 10);
}

async function stageWithBlockers(token: string) {
  const program = await programId(token, 'FW3');
  const rollup = await apiGet<ProgramReadiness>(token, `/api/programs/${program}/readiness`);
  const stage = rollup.stages.find((s) => s.assetCount > 0 && s.blockers.length > 0) ?? rollup.stages.find((s) => s.assetCount > 0);
  if (!stage) throw new Error('no demo stage with assets');
  return { program, stage, rollup };
}

describe('gate review at wide width', () => {
  it('when a lead opens a gate review from the readiness page and records a conditional go with an action, then the record is read-only and the decision is e-mailed', async () => {
    const token = await apiToken('lead@fenwater.example');
    const { stage } = await stageWithBlockers(token);
    const page = await newPage(browser, WIDE);
    await signIn(page, 'lead@fenwater.example', 'proofyard-demo', '/readiness');

    await page.getByTestId('readiness-rollup').waitFor();
    await page.getByTestId(`stage-readiness-${stage.stageId}`).waitFor();
    await page.getByTestId(`stage-blockers-${stage.stageId}`).waitFor();
    await screenshot(page, 'readiness-rollup-wide');

    await page.getByTestId(`stage-open-review-${stage.stageId}`).click();
    await page.getByTestId('gate-open').waitFor();
    await page.getByTestId('gate-attendees').fill('Ines Marrow (supplier), Tomas Kell');
    await page.getByTestId('gate-notes').fill(`E2E gate review ${Date.now()}`);
    await page.getByTestId('gate-open-submit').click();

    await waitUntil('the review page opens', async () => /\/gates\/[0-9a-f-]{36}$/.test(new URL(page.url()).pathname), 15_000);
    const reviewId = /\/gates\/([0-9a-f-]{36})$/.exec(new URL(page.url()).pathname)![1];
    const blockers = page.getByTestId('gate-blockers');
    await blockers.waitFor();
    if (stage.blockers.length > 0) await blockers.getByText(stage.blockers[0].text).first().waitFor();
    expect(await page.getByTestId('gate-review-attendees').textContent()).toContain('Tomas Kell');

    await page.getByTestId('gate-decision-conditional').click();
    await page.getByTestId('gate-action-title-0').fill('Close the coolant weep findings before the drive');
    await page.getByTestId('gate-action-owner-0').getByRole('radio').first().click();
    await page.getByTestId('gate-action-due-0').fill(weekAhead());
    await screenshot(page, 'gate-decision-wide');
    await page.getByTestId('gate-decision-submit').click();

    const decided = page.getByTestId('gate-decided');
    await decided.waitFor();
    expect(await decided.textContent()).toContain('A correction is a new review');
    expect(await decided.textContent()).toContain('Conditional go');
    expect(await page.getByTestId('gate-action-0').textContent()).toContain('Close the coolant weep findings before the drive');
    // Read-only: no decision form any more, also after a reload.
    expect(await page.getByTestId('gate-decision-submit').count()).toBe(0);
    await page.reload();
    await page.getByTestId('gate-decided').waitFor();
    expect(await page.getByTestId('gate-decision-submit').count()).toBe(0);
    await screenshot(page, 'gate-decided-wide');

    let mail: Mail | undefined;
    await waitUntil('the decision e-mail links to the review', async () => Boolean((mail = await mailLinking(`/gates/${reviewId}`))), 30_000);
    expect(mail!.text).toContain(`/gates/${reviewId}`);
    await page.context().close();
  }, 90_000);
});

describe('readiness at phone width', () => {
  it('when a lead opens the readiness page on a phone, then every stage shows as a card', async () => {
    const token = await apiToken('lead@fenwater.example');
    const { rollup } = await stageWithBlockers(token);
    const page = await newPage(browser, PHONE);
    await signIn(page, 'lead@fenwater.example', 'proofyard-demo', '/readiness');
    await page.getByTestId('readiness-rollup').waitFor();
    for (const stage of rollup.stages) {
      await page.getByTestId(`stage-readiness-${stage.stageId}`).waitFor({ state: 'attached' });
    }
    // Stacked: the first card spans the column and nothing runs off the side of the screen.
    const box = await page.getByTestId(`stage-readiness-${rollup.stages[0].stageId}`).boundingBox();
    expect(box).not.toBeNull();
    expect(box!.width).toBeGreaterThan(300);
    expect(box!.x + box!.width).toBeLessThanOrEqual(PHONE.width);
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await screenshot(page, 'readiness-rollup-phone');

    // The stage's trend: the chart, the forecast sentence and the table of figures.
    await page.getByTestId(`stage-trend-link-${rollup.stages[0].stageId}`).click();
    await page.getByTestId('trend-table').waitFor();
    expect(await page.getByTestId('stage-trend-forecast').textContent()).toBeTruthy();
    await screenshot(page, 'readiness-trend-phone');
    await page.context().close();
  }, 60_000);
});
