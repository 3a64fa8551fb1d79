import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { screenshot, signIn, startHarness, type Harness } from './harness';

let harness: Harness;

beforeAll(async () => {
  harness = await startHarness();
});
afterAll(async () => {
  await harness.stop();
});

describe('signing in', () => {
  it('shows the manager both demo farms with all their houses', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.getByRole('heading', { name: 'North Ridge' }).waitFor();
    await page.getByRole('heading', { name: 'Willow Creek' }).waitFor();
    await page.locator('[data-house-id]').nth(4).waitFor();
    const houses = await page.locator('[data-house-id] mat-card-title').allTextContents();
    expect(houses.map((h) => h.trim()).sort()).toEqual([
      'House 1',
      'House 2',
      'House 3',
      'House A',
      'House B',
    ]);
    // Managers may change house settings, so each card offers them.
    expect(await page.getByRole('link', { name: 'Settings' }).count()).toBe(5);
    // Managers do not manage users.
    expect(await page.getByRole('link', { name: 'Users' }).count()).toBe(0);
    await screenshot(page, 'farms-manager');
    await page.close();
  });

  it('tells the user when the e-mail and password do not match', async () => {
    const page = await harness.browser.newPage();
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test', 'wrong password');
    await page.getByRole('alert').waitFor();
    expect(await page.getByRole('alert').textContent()).toContain('do not match');
    expect(page.url()).toContain('/sign-in');
    await page.close();
  });

  it('shows form errors before sending anything', async () => {
    const page = await harness.browser.newPage();
    await page.goto(`${harness.baseUrl}/sign-in`);
    await page.getByLabel('E-mail').fill('not-an-address');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByText('That is not an e-mail address').waitFor();
    await page.getByText('Enter your password').waitFor();
    await page.close();
  });
});

describe('roles in the web app', () => {
  it('does not offer the crew admin pages, nor house settings, and turns them away by URL', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'crew@bramblewood.test');
    await page.getByRole('heading', { name: 'North Ridge' }).waitFor();
    await page.locator('[data-house-id]').first().waitFor();
    // Crew belong to North Ridge only.
    expect(await page.getByRole('heading', { name: 'Willow Creek' }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Users' }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Gateways' }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Settings' }).count()).toBe(0);
    await screenshot(page, 'farms-crew');
    await page.goto(`${harness.baseUrl}/users`);
    await page.waitForURL(/\/farms$/);
    await page.close();
  });

  it('lets the admin open the users page and see every demo user', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'admin@bramblewood.test');
    await page.getByRole('link', { name: 'Users' }).click();
    await page.getByRole('table', { name: 'Users' }).waitFor();
    const emails = await page.locator('td.mat-column-email').allTextContents();
    expect(emails.map((e) => e.trim()).sort()).toEqual([
      'admin@bramblewood.test',
      'crew@bramblewood.test',
      'integrator@bramblewood.test',
      'manager@bramblewood.test',
    ]);
    await screenshot(page, 'users-admin');
    await page.close();
  });

  it('lets the manager change a house threshold and keeps it after a reload', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.getByRole('link', { name: 'Settings' }).first().click();
    const threshold = page.getByLabel('Flag a row or tier below its peers by more than');
    await threshold.waitFor();
    await threshold.fill('60');
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.getByText('At most 50 %').waitFor();
    await threshold.fill('12');
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.getByText(/House \w+ saved/).waitFor();
    await screenshot(page, 'house-settings');
    await page.reload();
    await threshold.waitFor();
    await expect.poll(() => threshold.inputValue()).toBe('12');
    await page.close();
  });

  it('sends the user back to sign in with a message when the session has expired', async () => {
    const page = await harness.browser.newPage();
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.getByRole('heading', { name: 'North Ridge' }).waitFor();
    // Simulate expiry: a token the server no longer accepts.
    await page.evaluate(() => {
      const key = 'tierscope.session';
      const session = JSON.parse(localStorage.getItem(key) ?? '{}') as { token: string };
      localStorage.setItem(key, JSON.stringify({ ...session, token: `${session.token}x` }));
    });
    await page.reload();
    await page.getByText('Your session has ended').waitFor();
    await page.close();
  });
});

describe('on a phone', () => {
  it('puts the navigation in a drawer', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 360, height: 740 } });
    await signIn(page, harness.baseUrl, 'admin@bramblewood.test');
    await page.getByRole('heading', { name: 'North Ridge' }).waitFor();
    await page.getByRole('button', { name: 'Open navigation' }).click();
    await page.getByRole('link', { name: 'Users' }).click();
    await page.getByRole('table', { name: 'Users' }).waitFor();
    await screenshot(page, 'phone-users');
    await page.close();
  });
});

describe('the API document in the browser', () => {
  it('renders every route at /api/docs from files the app serves itself', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    const refused: string[] = [];
    page.on('console', (message) => {
      if (message.type() === 'error') refused.push(message.text());
    });
    const elsewhere: string[] = [];
    page.on('request', (request) => {
      if (!request.url().startsWith(harness.baseUrl) && !request.url().startsWith('data:'))
        elsewhere.push(request.url());
    });
    await page.goto(`${harness.baseUrl}/api/docs`);
    await page.getByRole('heading', { name: /Tierscope API/ }).waitFor();
    // Routes of every kind: a gateway's, a public one, one with a date in its path.
    await page.getByText('/api/v1/ingest/readings', { exact: true }).waitFor();
    await page.getByText('/api/v1/auth/login', { exact: true }).waitFor();
    await page.getByText('/api/v1/flocks/{flockId}/mortality/{day}', { exact: true }).waitFor();
    expect(await page.locator('.opblock').count()).toBeGreaterThan(50);
    expect(elsewhere).toEqual([]);
    expect(refused).toEqual([]);
    // The document viewer is a third-party page: its markup is not ours to fix.
    await screenshot(page, 'api-docs', { checks: false });
    await page.close();
  });
});
