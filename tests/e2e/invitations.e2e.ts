import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  dialogCloses,
  screenshot,
  signIn,
  startHarness,
  type Harness,
  openedDialog,
} from './harness';

let harness: Harness;

beforeAll(async () => {
  harness = await startHarness();
}, 120_000);

afterAll(async () => {
  await harness.stop();
});

/** The set-password link of a mail, moved to the harness's own address (mails link to PUBLIC_URL). */
function linkIn(text: string): string {
  const match = /https?:\/\/[^/\s]+(\/set-password\?token=[A-Za-z0-9_-]+)/.exec(text);
  if (!match?.[1]) throw new Error(`no set-password link in: ${text}`);
  return `${harness.baseUrl}${match[1]}`;
}

describe('invitations and forgotten passwords', () => {
  it('an admin invites a new crew member, who chooses a password from the mail and is signed in', async () => {
    const admin = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(admin, harness.baseUrl, 'admin@bramblewood.test');
    await admin.getByRole('link', { name: 'Users' }).click();
    await admin.getByRole('button', { name: 'Add user' }).click();
    const dialog = await openedDialog(admin);
    await dialog.getByLabel('E-mail').fill('robin.newhand@bramblewood.test');
    await dialog.getByLabel('Name').fill('Robin Newhand');
    const northRidge = dialog.getByRole('combobox', { name: 'North Ridge' });
    await northRidge.click();
    await admin.getByRole('option', { name: 'crew' }).click();
    // The choice has landed and its panel is gone before the form is sent.
    await admin.getByRole('listbox').waitFor({ state: 'detached' });
    await northRidge.filter({ hasText: 'crew' }).waitFor();
    await screenshot(admin, 'invite-1-dialog');
    await dialog.getByRole('button', { name: 'Add user' }).click();
    await dialogCloses(dialog);
    await admin.close();

    const mail = await harness.mail.waitFor((m) => m.to.includes('robin.newhand@bramblewood.test'));
    expect(mail.subject).toBe('[Tierscope · North Ridge] You are invited to Tierscope');
    const page = await harness.browser.newPage({ viewport: { width: 390, height: 800 } });
    await page.goto(linkIn(mail.text));
    await page.getByLabel('New password').fill('my first barn password');
    await page.getByLabel('The same again').fill('my first barn password');
    await screenshot(page, 'invite-2-set-password');
    await page.getByRole('button', { name: 'Save and sign in' }).click();
    await page.waitForURL('**/farms');
    await page.getByRole('heading', { name: 'North Ridge' }).waitFor();
    // The link works once.
    await page.goto(linkIn(mail.text));
    await page.getByLabel('New password').fill('another password here');
    await page.getByLabel('The same again').fill('another password here');
    await page.getByRole('button', { name: 'Save and sign in' }).click();
    await page.getByText('This link has expired or was already used').waitFor();
    await page.close();
  });

  it('a user who forgot the password gets a link by mail and the same answer for an unknown address', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 390, height: 800 } });
    await page.goto(`${harness.baseUrl}/sign-in`);
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    // Under load the sign-in page may still be on screen (a click before the app started loads the page
    // anew): fill the form only once the forgotten-password page is there.
    await page.getByRole('heading', { name: 'Forgot your password?' }).waitFor();
    await page.getByLabel('E-mail').fill('nobody@bramblewood.test');
    await page.getByRole('button', { name: 'Mail me a link' }).click();
    const unknown = await page.getByRole('status').textContent();
    await page.goto(`${harness.baseUrl}/forgot-password`);
    await page.getByRole('heading', { name: 'Forgot your password?' }).waitFor();
    await page.getByLabel('E-mail').fill('crew@bramblewood.test');
    await page.getByRole('button', { name: 'Mail me a link' }).click();
    expect(await page.getByRole('status').textContent()).toBe(unknown);
    await screenshot(page, 'forgot-1-sent');

    const mail = await harness.mail.waitFor(
      (m) =>
        m.to.includes('crew@bramblewood.test') && m.subject === '[Tierscope] Reset your password',
    );
    await page.goto(linkIn(mail.text));
    await page.getByLabel('New password').fill('a fresh crew password');
    await page.getByLabel('The same again').fill('a fresh crew password');
    await page.getByRole('button', { name: 'Save and sign in' }).click();
    await page.waitForURL('**/farms');
    await page.close();

    const again = await harness.browser.newPage();
    await signIn(again, harness.baseUrl, 'crew@bramblewood.test', 'a fresh crew password');
    await again.waitForURL('**/farms');
    await again.close();
  });
});
