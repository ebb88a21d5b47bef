import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, newPage, PHONE, screenshot, signIn, WIDE } from '../helpers/browser';

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

async function mailTo(address: string) {
  for (let i = 0; i < 50; i += 1) {
    const res = await fetch(`${BASE_URL}/api/dev/mail`);
    const { messages } = (await res.json()) as { messages: Array<{ to: string; text: string; subject: string }> };
    const found = messages.find((m) => m.to.includes(address));
    if (found) return found;
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`no mail to ${address}`);
}

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('admin invitation at %s width', (label, viewport) => {
  it('when an admin invites a user, then the user sets a password from the e-mailed link and is signed in', async () => {
    const email = `new-${label}-${Date.now()}@fenwater.example`;
    const page = await newPage(browser, viewport);
    await signIn(page, 'admin@fenwater.example', 'proofyard-demo', '/admin/users');
    await page.getByTestId('invite-email').fill(email);
    await page.getByTestId('invite-name').fill(`Rosalind Tenby ${label}`);
    await page.getByTestId('invite-role-driver').click();
    await page.getByTestId('invite-submit').click();
    await page.getByText(`Invitation sent to ${email}`).waitFor();
    await screenshot(page, `admin-invited-${label}`);

    const mail = await mailTo(email);
    const link = /(http\S+set-password\?token=[A-Za-z0-9_-]+)/.exec(mail.text)![1];
    const invitee = await newPage(browser, viewport);
    await invitee.goto(`${BASE_URL}/dev/inbox`);
    await invitee.getByText(mail.subject).first().waitFor();
    await invitee.goto(link.replace(/^https?:\/\/[^/]+/, BASE_URL));
    await invitee.getByTestId('set-password-password').fill('invitee-password-1');
    await invitee.getByTestId('set-password-confirm').fill('invitee-password-1');
    await invitee.getByTestId('set-password-submit').click();
    await invitee.getByTestId('home-user-name').waitFor();
    await expect(invitee.getByTestId('home-user-name').textContent()).resolves.toContain('Rosalind Tenby');
    await screenshot(invitee, `invitee-home-${label}`);
    await page.context().close();
    await invitee.context().close();
  });
});
