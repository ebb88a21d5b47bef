import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, signIn, waitUntil, WIDE } from '../helpers/browser';
import { apiGet, apiToken, programId } from '../helpers/api';
import type { GateReview, ProgramReadiness } from '../../shared/schemas/readiness';

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

async function apiSend<T>(token: string, method: string, path: string, body: object): Promise<T> {
  const res = await fetch(`${BASE_URL}${path}`, {
    method,
    headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
    body: JSON.stringify(body),
  });
  if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

/** The page's horizontal overflow in pixels (0 when nothing runs off the side). */
const overflow = (page: import('playwright-core').Page) => page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

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

    // Until the decision, the lead changes who attended: tick a member, drop a guest, add another.
    await page.getByTestId('gate-attendees-change').click();
    await page.getByTestId('gate-attendees-edit').waitFor();
    await page.getByTestId('gate-edit-attendees-people').getByRole('checkbox', { name: /Ilkka Varde/ }).click();
    await page.getByRole('button', { name: 'Remove Tomas Kell' }).click();
    await page.getByTestId('gate-edit-attendees').fill('Ruth Calder (test rig supplier)');
    await page.getByTestId('gate-edit-attendees-add').click();
    await page.getByTestId('gate-edit-notes').fill('Attendance corrected after the meeting.');
    await page.getByTestId('gate-attendees-edit').scrollIntoViewIfNeeded();
    await screenshot(page, 'gate-attendees-edit-wide');
    await page.getByTestId('gate-attendees-save').click();
    await page.getByTestId('gate-attendees-saved').waitFor();
    const attendees = await page.getByTestId('gate-review-attendees').textContent();
    expect(attendees).toContain('Ilkka Varde');
    expect(attendees).toContain('Ruth Calder (test rig supplier)');
    expect(attendees).toContain('Ines Marrow (supplier)');
    expect(attendees).not.toContain('Tomas Kell');
    expect(await page.getByTestId('gate-review-notes').textContent()).toBe('Attendance corrected after the meeting.');

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

    // Once decided, the attendees can no longer be changed.
    expect(await page.getByTestId('gate-attendees-change').count()).toBe(0);
    expect(await page.getByTestId('gate-review-attendees').textContent()).toContain('Ruth Calder');

    let mail: Mail | undefined;
    await waitUntil('the decision e-mail links to the review', async () => Boolean((mail = await mailLinking(`/gates/${reviewId}`))), 30_000);
    expect(mail!.text).toContain(`/gates/${reviewId}`);
    expect(mail!.text).toContain('Ruth Calder (test rig supplier)');

    // The lead owns the action just recorded: it shows on the home page and in their gate actions.
    const title = 'Close the coolant weep findings before the drive';
    await page.getByTestId('nav-home').first().click();
    const home = page.getByTestId('home-gate-actions');
    await home.getByText(title).first().waitFor();
    await screenshot(page, 'home-gate-actions-wide');
    await page.getByTestId('home-gate-actions-link').click();
    await page.getByTestId('my-gate-actions').waitFor();
    const item = page.getByTestId(/^my-action-\d+$/).filter({ hasText: title });
    await item.waitFor();
    expect(await item.textContent()).toContain('gate review');
    await item.locator('[data-testid$="-done"]').click();
    await item.locator('[data-testid$="-note-field"]').fill('Both weeping hoses replaced and re-checked warm.');
    await screenshot(page, 'my-gate-actions-wide');
    await item.locator('[data-testid$="-confirm"]').click();
    const closed = page.getByTestId('my-gate-actions-done').getByTestId(/^my-done-action-\d+$/).filter({ hasText: title });
    await closed.waitFor();
    expect(await closed.textContent()).toContain('Both weeping hoses replaced and re-checked warm.');
    // The review shows it done too.
    await page.goto(`${BASE_URL}/gates/${reviewId}`);
    await page.getByTestId('gate-action-0-status').waitFor();
    expect(await page.getByTestId('gate-action-0-status').textContent()).toBe('Done');
    await page.context().close();
  }, 150_000);
});

describe('gate reviews and gate actions at phone width', () => {
  it('when a lead changes the attendees of an open review on a phone and records a no-go, then the review lists the new people, is read-only and is e-mailed', async () => {
    const token = await apiToken('lead@fenwater.example');
    const program = await programId(token, 'FW3');
    const open = await apiGet<{ items: Array<{ stageId: string; decision: string | null }> }>(token, `/api/gate-reviews?programId=${program}`);
    const rollup = await apiGet<ProgramReadiness>(token, `/api/programs/${program}/readiness`);
    const busy = new Set(open.items.filter((r) => r.decision === null).map((r) => r.stageId));
    const stage = rollup.stages.find((s) => !busy.has(s.stageId));
    if (!stage) throw new Error('no stage without an open review');
    const review = await apiSend<GateReview>(token, 'POST', '/api/gate-reviews', { stageId: stage.stageId, attendees: ['Guest from the test track'] });

    const page = await newPage(browser, PHONE);
    await signIn(page, 'lead@fenwater.example', 'proofyard-demo', `/gates/${review.id}`);
    await page.getByTestId('gate-attendees-change').click();
    await page.getByTestId('gate-attendees-edit').waitFor();
    // Many members: the filter narrows the list.
    await page.getByTestId('gate-edit-attendees-filter').fill('Tamsin');
    await page.getByTestId('gate-edit-attendees-people').getByRole('checkbox', { name: /Tamsin Orrell/ }).click();
    await page.getByTestId('gate-edit-attendees').fill('Night shift supervisor');
    await page.getByTestId('gate-attendees-edit').scrollIntoViewIfNeeded();
    await screenshot(page, 'gate-attendees-edit-phone');
    expect(await overflow(page)).toBeLessThanOrEqual(0);
    await page.getByTestId('gate-attendees-save').click();
    await page.getByTestId('gate-attendees-saved').waitFor();
    const attendees = await page.getByTestId('gate-review-attendees').textContent();
    // The name typed but not added with the button counts too.
    for (const name of ['Guest from the test track', 'Tamsin Orrell', 'Night shift supervisor']) expect(attendees).toContain(name);
    await page.getByTestId('gate-attendees-card').scrollIntoViewIfNeeded();
    await screenshot(page, 'gate-attendees-saved-phone');

    // Then the decision, on the phone: no-go, recorded once and e-mailed to the members.
    const notes = `Not ready: blockers stand (phone review ${Date.now()})`;
    await page.getByTestId('gate-decision-no-go').click();
    await page.getByTestId('gate-decision-notes').fill(notes);
    await page.getByTestId('gate-decision-submit').scrollIntoViewIfNeeded();
    await screenshot(page, 'gate-decision-phone');
    expect(await overflow(page)).toBeLessThanOrEqual(0);
    await page.getByTestId('gate-decision-submit').click();
    const decided = page.getByTestId('gate-decided');
    await decided.waitFor();
    expect(await decided.textContent()).toContain('No-go');
    expect(await page.getByTestId('gate-decision-submit').count()).toBe(0);
    expect(await page.getByTestId('gate-attendees-change').count()).toBe(0);
    await decided.scrollIntoViewIfNeeded();
    await screenshot(page, 'gate-decided-phone');
    let mail: Mail | undefined;
    await waitUntil('the no-go e-mail links to the review', async () => Boolean((mail = await mailLinking(`/gates/${review.id}`))), 30_000);
    expect(mail!.text).toContain('Night shift supervisor');
    await page.context().close();
  }, 120_000);

  it('when a technician with an overdue gate action signs in on a phone, then home shows it and they mark it done with a note', async () => {
    const page = await newPage(browser, PHONE);
    await signIn(page, 'technician@fenwater.example');
    const home = page.getByTestId('home-gate-actions');
    await home.waitFor();
    await page.getByTestId('home-action-0-overdue').waitFor();
    expect(await page.getByTestId('home-gate-actions-summary').textContent()).toMatch(/1 open, 1 overdue/);
    await home.scrollIntoViewIfNeeded();
    await screenshot(page, 'home-gate-actions-phone');
    expect(await overflow(page)).toBeLessThanOrEqual(0);

    await page.getByTestId('home-gate-actions-link').click();
    await page.getByTestId('my-gate-actions').waitFor();
    const item = page.getByTestId('my-action-0');
    expect(await item.textContent()).toContain('Re-run the isolation resistance measurement');
    expect(await item.textContent()).toContain('Bench gate review');
    await page.getByTestId('my-action-0-start').click();
    await waitUntil('the action is in work', async () => (await page.getByTestId('my-action-0-status').textContent()) === 'In work');
    await page.getByTestId('my-action-0-done').click();
    await page.getByTestId('my-action-0-note-field').fill('Measured all six rigs with the calibrated tester: all above 500 MOhm.');
    await screenshot(page, 'my-gate-actions-phone');
    expect(await overflow(page)).toBeLessThanOrEqual(0);
    await page.getByTestId('my-action-0-confirm').click();
    await page.getByTestId('my-gate-actions-done').waitFor();
    await page.getByTestId('my-gate-actions-empty').or(page.getByTestId('my-gate-actions-summary')).first().waitFor();
    expect(await page.getByTestId('my-gate-actions-summary').textContent()).toMatch(/Nothing open/);
    expect(await page.getByTestId('my-done-action-0-note').textContent()).toContain('all above 500 MOhm');
    await page.getByTestId('my-gate-actions-done').scrollIntoViewIfNeeded();
    await screenshot(page, 'my-gate-actions-done-phone');
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
