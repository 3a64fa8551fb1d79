import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { screenshot, signIn, startHarness, type Harness } from './harness';

let harness: Harness;

beforeAll(async () => {
  harness = await startHarness();
});
afterAll(async () => {
  await harness.stop();
});

describe('gateways', () => {
  it('lets the integrator make a key that works once shown, and revoke it', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'integrator@bramblewood.test');
    await page.getByRole('link', { name: 'Gateways' }).click();
    await page.getByText('No gateways yet').waitFor();
    await page.getByLabel('New gateway name').fill('House 1 controller');
    await page.getByRole('button', { name: 'Make a key' }).click();
    const key = (await page.getByTestId('new-key').textContent())?.trim() ?? '';
    expect(key).toMatch(/^tsg_/);
    await page.getByRole('table', { name: 'Gateways' }).waitFor();
    await screenshot(page, 'gateways-new-key');

    // The key shown is the one that works: post a reading with it.
    const post = () =>
      fetch(`${harness.baseUrl}/api/v1/ingest/readings`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
        body: JSON.stringify({
          readings: [{ counter: 'H1-R1-T1', ts: new Date().toISOString(), eggs: 3 }],
        }),
      });
    expect((await post()).status).toBe(200);

    // Once dismissed it is gone for good; the list shows only its first characters.
    await page.getByRole('button', { name: 'Done' }).click();
    await expect.poll(() => page.getByTestId('new-key').count()).toBe(0);
    expect(await page.locator('td.mat-column-keyPrefix').first().textContent()).toContain(
      key.slice(0, 12),
    );

    page.once('dialog', (dialog) => void dialog.accept());
    await page.getByRole('button', { name: 'Revoke House 1 controller' }).click();
    await page.getByText('Revoked', { exact: false }).first().waitFor();
    expect((await post()).status).toBe(401);
    await screenshot(page, 'gateways-revoked');
    await page.close();
  });
});
