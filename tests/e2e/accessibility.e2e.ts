import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { signInThroughApi } from '../../scripts/processes';
import {
  accessibilityFindings,
  describeFindings,
  screenshot,
  signIn,
  startHarness,
  type AccessibilityFinding,
  type Harness,
} from './harness';

// axe-core on every page of the app, signed out and as an admin (who sees every page), at a desktop and a
// phone width: no serious or critical finding anywhere.

let harness: Harness;
let houseId: number;
let workOrderId: number;

beforeAll(async () => {
  harness = await startHarness();
  const { token } = await signInThroughApi(
    harness.baseUrl,
    'admin@bramblewood.test',
    'tierscope-demo',
  );
  const call = async (path: string, init: RequestInit = {}) => {
    const response = await fetch(`${harness.baseUrl}/api/v1${path}`, {
      ...init,
      headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
    });
    expect(response.ok, `${path}: ${response.status}`).toBe(true);
    return (await response.json()) as unknown;
  };
  const farms = (await call('/farms')) as { id: number }[];
  const houses = (await call(`/farms/${farms[0]!.id}/houses`)) as { id: number }[];
  houseId = houses[0]!.id;
  const order = (await call('/work-orders', {
    method: 'POST',
    body: JSON.stringify({
      houseId,
      row: 2,
      tier: 3,
      title: 'Check the nest curtain',
      checklist: ['Look at the curtain', 'Test the belt'],
    }),
  })) as { id: number };
  workOrderId = order.id;
});
afterAll(async () => {
  await harness.stop();
});

/** Opens a page and waits until it has settled: its title shown and nothing still loading. */
async function open(page: Page, path: string): Promise<void> {
  await page.goto(`${harness.baseUrl}${path}`);
  await page.locator('h1').first().waitFor();
  await page.waitForLoadState('networkidle');
  await expect.poll(() => page.getByText(/^Loading/).count(), { timeout: 15_000 }).toBe(0);
}

function signedInPages(): string[] {
  return [
    '/farms',
    `/houses/${houseId}`,
    `/houses/${houseId}/flock`,
    `/houses/${houseId}/settings`,
    '/exceptions',
    '/my-work',
    '/work-orders',
    `/work-orders/${workOrderId}`,
    '/reports',
    '/imports',
    '/counters',
    '/gateways',
    '/users',
    '/notifications',
    '/mailbox',
  ];
}

/** A small controller export: one day of hourly counts per row and tier of a 6 × 3 house. */
function importFile(): string {
  const lines = ['time,row,tier,eggs'];
  for (let hour = 0; hour < 16; hour++)
    for (let row = 1; row <= 6; row++)
      for (let tier = 1; tier <= 3; tier++)
        lines.push(
          `2026-09-01T${String(10 + (hour % 14)).padStart(2, '0')}:00:00Z,${row},${tier},${60 + row + tier}`,
        );
  return lines.join('\n');
}

describe('tables on a phone', () => {
  it('reads each work order as a card with every value on screen, under its column name', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 390, height: 900 } });
    await signIn(page, harness.baseUrl, 'admin@bramblewood.test');
    await page.waitForURL(/\/farms$/);
    await open(page, '/work-orders');
    const row = page.getByRole('table', { name: 'Work orders' }).locator('tr.mat-mdc-row').first();
    await row.waitFor();
    // Every cell of the row is inside the 390 px screen: nothing to scroll sideways for.
    const rights = await row
      .locator('td')
      .evaluateAll((cells) => cells.map((c) => c.getBoundingClientRect().right));
    expect(rights.length).toBeGreaterThan(5);
    expect(Math.max(...rights)).toBeLessThanOrEqual(390);
    expect(await row.locator('td[data-label="Title"]').textContent()).toContain(
      'Check the nest curtain',
    );
    await screenshot(page, 'work-orders-phone-cards');
    await page.close();
  });
});

describe('accessibility (axe-core, serious and critical)', () => {
  for (const width of [1280, 390]) {
    it(`finds nothing serious on any page at ${width} px`, async () => {
      const page = await harness.browser.newPage({ viewport: { width, height: 900 } });
      const findings: AccessibilityFinding[] = [];
      for (const path of ['/sign-in', '/forgot-password']) {
        await open(page, path);
        findings.push(...(await accessibilityFindings(page, `${path} @${width}`)));
      }
      await signIn(page, harness.baseUrl, 'admin@bramblewood.test');
      await page.waitForURL(/\/farms$/);
      for (const path of signedInPages()) {
        await open(page, path);
        findings.push(...(await accessibilityFindings(page, `${path} @${width}`)));
      }
      // The import flow with a file chosen (its preview table) and one import run (its progress and summary).
      await open(page, '/imports');
      await page.getByTestId('import-file').setInputFiles({
        name: `a11y-${width}.csv`,
        mimeType: 'text/csv',
        buffer: Buffer.from(importFile()),
      });
      await page.getByRole('region', { name: /Preview of the file/ }).waitFor();
      findings.push(...(await accessibilityFindings(page, `/imports (file chosen) @${width}`)));
      await page.getByRole('button', { name: /^Import into/ }).click();
      await page.getByRole('region', { name: new RegExp(`Import of a11y-${width}`) }).waitFor();
      findings.push(...(await accessibilityFindings(page, `/imports (importing) @${width}`)));
      await page.close();
      expect(describeFindings(findings)).toBe('');
    });
  }
});
