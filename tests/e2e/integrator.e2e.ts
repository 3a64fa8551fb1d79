import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import {
  dialogCloses,
  screenshot,
  signIn,
  startHarness,
  type Harness,
  openedDialog,
} from './harness';

// The integrator's screens: gateway keys, and the counters a gateway sent that no house has yet.

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

/** The signed-in user's token, as the web app keeps it. */
const tokenOf = (page: Page) =>
  page.evaluate(
    () =>
      (JSON.parse(localStorage.getItem('tierscope.session') ?? '{}') as { token: string }).token,
  );

describe('unknown counters', () => {
  it('places a held counter on a belt, and its readings count in that cell of the map', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'integrator@bramblewood.test');
    await page.getByRole('heading', { name: 'North Ridge' }).waitFor();
    const token = await tokenOf(page);
    const api = async (path: string, body: unknown, bearer = token) => {
      const response = await fetch(`${harness.baseUrl}/api/v1${path}`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', authorization: `Bearer ${bearer}` },
        body: JSON.stringify(body),
      });
      expect(response.ok, `${path}: ${response.status}`).toBe(true);
      return (await response.json()) as Record<string, unknown>;
    };
    const farms = (await (
      await fetch(`${harness.baseUrl}/api/v1/farms`, {
        headers: { authorization: `Bearer ${token}` },
      })
    ).json()) as { id: number; name: string }[];
    const northRidge = farms.find((f) => f.name === 'North Ridge')!;
    const { key } = (await api(`/farms/${northRidge.id}/gateways`, { name: 'Spare gateway' })) as {
      key: string;
    };
    // A replacement belt counter the house does not know yet: 12 readings of 40 eggs over the last
    // two hours; and a mistyped id with one reading.
    const now = Date.now();
    const readings = Array.from({ length: 12 }, (_, i) => ({
      counter: 'NR-SPARE-07',
      ts: new Date(now - (i + 1) * 10 * 60_000).toISOString(),
      eggs: 40,
    }));
    const sent = await api('/ingest/readings', { readings }, key);
    expect(sent['unmappedCounters']).toEqual(['NR-SPARE-07']);
    await api(
      '/ingest/readings',
      { readings: [{ counter: 'NR-SPRAE-07', ts: new Date(now - 60_000).toISOString(), eggs: 3 }] },
      key,
    );

    // The gateways page says ids are waiting, and leads to them.
    await page.getByRole('link', { name: 'Gateways' }).click();
    const waiting = page.getByTestId('unknown-counters');
    await waiting.waitFor();
    expect(await waiting.textContent()).toContain('2 counter ids sent by this farm');
    await waiting.getByRole('link', { name: 'Place them' }).click();
    const table = page.getByRole('table', { name: 'Unknown counters' });
    const spare = table.getByRole('row').filter({ hasText: 'NR-SPARE-07' });
    await spare.waitFor();
    expect(await spare.textContent()).toContain('480');
    await screenshot(page, 'unknown-counters');

    await spare.getByRole('button', { name: 'Place NR-SPARE-07' }).click();
    const dialog = await openedDialog(page);
    await dialog.getByText('12 held readings (480 eggs)').waitFor();
    // House 1 is the first house; choose row 2, tier 3 (a select opens only once its options are loaded).
    await dialog.getByRole('combobox', { name: 'House' }).getByText('House 1').waitFor();
    await dialog.getByRole('combobox', { name: 'Row' }).click();
    await page.getByRole('option', { name: 'Row 2', exact: true }).click();
    await dialog.getByRole('combobox', { name: 'Tier' }).click();
    await page.getByRole('option', { name: 'Tier 3', exact: true }).click();
    await dialog.getByTestId('current-counter').waitFor();
    await page.getByRole('listbox').waitFor({ state: 'hidden' });
    await screenshot(page, 'unknown-counters-place-dialog');
    await dialog.getByRole('button', { name: 'Place counter' }).click();
    await dialogCloses(dialog);

    const placed = page.getByTestId('placed');
    await placed.getByText('NR-SPARE-07 now counts House 1, row 2, tier 3').waitFor();
    expect(await placed.textContent()).toContain('12 held readings (480 eggs) were counted there');
    expect(await table.getByRole('row').filter({ hasText: 'NR-SPARE-07' }).count()).toBe(0);
    await screenshot(page, 'unknown-counters-placed');

    // The map's cell now holds the readings of today's production day (all of them unless lights-on
    // fell within the last two hours); before, no counter there had counted anything.
    await placed.getByRole('link', { name: "Open House 1's map" }).click();
    const cell = page
      .locator('[data-testid="map-table"] tr[data-row="2"][data-tier="3"] td')
      .nth(2);
    await expect
      .poll(async () => Number((await cell.textContent())?.trim()), { timeout: 30_000 })
      .toBeGreaterThan(0);
    expect(Number((await cell.textContent())?.trim())).toBeLessThanOrEqual(480);
    await page.close();
  });

  it('forgets a mistyped id, and is usable on a phone', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 390, height: 800 } });
    await signIn(page, harness.baseUrl, 'integrator@bramblewood.test');
    await page.waitForURL(/\/farms$/);
    await page.goto(`${harness.baseUrl}/counters`);
    const typo = page.getByRole('row').filter({ hasText: 'NR-SPRAE-07' });
    await typo.waitFor();
    const forget = typo.getByRole('button', { name: 'Forget NR-SPRAE-07' });
    // On a phone the list reads as cards, each with its actions in reach.
    expect(await forget.isVisible()).toBe(true);
    const box = await forget.boundingBox();
    expect(box!.x + box!.width).toBeLessThanOrEqual(390);
    await screenshot(page, 'unknown-counters-phone');

    page.once('dialog', (confirm) => {
      expect(confirm.message()).toContain(
        'Forget counter NR-SPRAE-07 and its 1 held reading (3 eggs)',
      );
      void confirm.accept();
    });
    await forget.click();
    await page
      .getByText('No unknown counters: every counter id the gateways send has its place.')
      .waitFor();
    await screenshot(page, 'unknown-counters-empty-phone');
    await page.close();
  });
});
