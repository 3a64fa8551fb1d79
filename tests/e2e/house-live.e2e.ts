import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { prepareSimulatorFarms } from '../../scripts/demo-simulator';
import { screenshot, signIn, startHarness, type Harness } from './harness';

const ROOT = new URL('../..', import.meta.url).pathname;
let harness: Harness;
let dir: string;

beforeAll(async () => {
  harness = await startHarness();
  dir = mkdtempSync(join(tmpdir(), 'tierscope-e2e-sim-'));
  // The simulator plants a feed-line fault in House 1, row 3, for the last two days of a week of history,
  // a dead belt counter in House 2, row 2, tier 1, for the last 30 hours, and a water problem on House 3's
  // tier 3 that has taken a little more off every hour for three days.
  const farmFiles = await prepareSimulatorFarms({
    apiUrl: harness.baseUrl,
    dataDir: dir,
    flocks: new Map(),
  });
  const simulator = spawn(
    process.execPath,
    [
      '--import',
      'tsx',
      'simulator/src/main.ts',
      '--farm-file',
      farmFiles[0]!,
      '--seed',
      '11',
      '--backfill-days',
      '8',
      '--backfill-interval',
      '30',
      '--duration',
      '0',
      '--fault',
      'feed:house=House 1,row=3,drop=0.2,from=-2d',
      '--fault',
      'silent:house=House 2,row=2,tier=1,from=-30h',
      '--fault',
      'water:house=House 3,tier=3,decline=0.004/h,from=-3d',
    ],
    { cwd: ROOT, stdio: ['ignore', 'ignore', 'inherit'] },
  );
  expect(
    await new Promise<number>((resolve) =>
      simulator.once('exit', (code) => {
        resolve(code ?? 1);
      }),
    ),
  ).toBe(0);
}, 180_000);

afterAll(async () => {
  await harness.stop();
  rmSync(dir, { recursive: true, force: true });
});

describe('the house live page', () => {
  it('shows the planted fault flagged on the map, live', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 1000 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.getByRole('heading', { name: 'North Ridge' }).waitFor();
    // The engine evaluates the imported days once the readings stop arriving; wait for its verdict.
    const token = await page.evaluate(
      () =>
        (JSON.parse(localStorage.getItem('tierscope.session') ?? '{}') as { token: string }).token,
    );
    await expect
      .poll(
        async () => {
          const response = await fetch(
            `${harness.baseUrl}/api/v1/exceptions?status=live&kind=shortfall`,
            { headers: { authorization: `Bearer ${token}` } },
          );
          const list = (await response.json()) as {
            houseName: string;
            scope: string;
            row: number;
          }[];
          return list.some((e) => e.houseName === 'House 1' && e.scope === 'row' && e.row === 3);
        },
        { timeout: 90_000, interval: 1000 },
      )
      .toBe(true);

    // Today's map comes over the socket: opening the page reads the exception list once and the map
    // not at all over HTTP (it used to read the map twice).
    await page.waitForLoadState('networkidle');
    const reads: string[] = [];
    page.on('request', (r) => {
      if (/\/api\/v1\/(houses\/\d+\/map|exceptions)/.test(r.url())) reads.push(r.url());
    });
    await page.getByRole('link', { name: 'Live map of House 1' }).click();
    await page.getByTestId('connection').getByText('Live').waitFor();
    await page.getByText('Row 3 short (all tiers)').waitFor();
    expect(reads.filter((url) => url.includes('/map'))).toEqual([]);
    expect(reads.filter((url) => url.includes('/exceptions'))).toHaveLength(1);
    const flagged = page.locator('[data-testid="map-table"] tr[data-exception="shortfall"]');
    await expect.poll(() => flagged.count()).toBe(3);
    expect(
      await flagged.evaluateAll((rows) => rows.map((r) => r.getAttribute('data-row'))),
    ).toEqual(['3', '3', '3']);
    // The whole row is judged beside the cells, flagged with its exception; no other row is.
    await page.locator('[data-line="row-3"][data-flagged="true"]').waitFor();
    expect(await page.locator('[data-line^="row-"][data-flagged="true"]').count()).toBe(1);
    await screenshot(page, 'house-live-fault');
    const phone = await harness.browser.newPage({ viewport: { width: 390, height: 900 } });
    await signIn(phone, harness.baseUrl, 'manager@bramblewood.test');
    await phone.waitForURL(/\/farms$/);
    await phone.goto(page.url());
    const errors: string[] = [];
    phone.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    await phone.locator('[data-line="row-3"][data-flagged="true"]').waitFor();
    // The chart redraws once it knows its narrow width; give it that moment before the screenshot.
    await phone.waitForTimeout(1000);
    expect(errors).toEqual([]);
    await screenshot(phone, 'house-live-fault-phone');
    await phone.close();

    // A cell opens its detail with the likely checks of the row.
    const box = await page.locator('ts-house-heat-map canvas').first().boundingBox();
    expect(box).not.toBeNull();
    // Row 3 of 6 is the third column of the grid (the chart's left margin is 64 px).
    const x = box!.x + 64 + ((box!.width - 80) / 6) * 2.5;
    await page.mouse.click(x, box!.y + 60);
    await page.getByRole('heading', { name: /Row 3, tier/ }).waitFor();
    await page.getByText("This row's feed line").first().waitFor();
    await screenshot(page, 'house-live-detail');
    await page.close();
  });

  it('lists the fault on the exceptions page, where the manager acknowledges it', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.getByRole('link', { name: 'Exceptions' }).click();
    await page.getByRole('table', { name: 'Exceptions' }).waitFor();
    const row = page.getByRole('row').filter({ hasText: 'Row 3 (all tiers)' });
    await row.getByRole('button', { name: 'Acknowledge' }).click();
    await row.getByText('Acknowledged by Morgan Manager').waitFor();
    await screenshot(page, 'exceptions');
    await page.close();
  });

  it('says since when a dead counter is silent, what its peers counted by now and what it missed', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 1000 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.getByRole('heading', { name: 'North Ridge' }).waitFor();
    await page.getByRole('link', { name: 'Live map of House 2' }).click();
    const cell = page.locator(
      '[data-testid="map-table"] tr[data-row="2"][data-tier="1"][data-exception="silent_counter"]',
    );
    await cell.waitFor({ state: 'attached', timeout: 90_000 });
    // Its tier reads short by the eggs it misses, but that is a counter matter, not a tier fault: the
    // other cells of tier 1 keep their peers' yardstick and read as usual.
    const others = await page
      .locator('[data-testid="map-table"] tr[data-tier="1"]:not([data-row="2"]) td:nth-child(4)')
      .evaluateAll((cells) => cells.map((c) => Number.parseFloat(c.textContent)));
    expect(others).toHaveLength(5);
    expect(others.sort((a, b) => a - b)[2]).toBeGreaterThan(94);
    // Row 2 of 6 is the grid's second column; tier 1 is its bottom band (the chart's margins: left 64,
    // right 16, top 8, bottom 64).
    const box = await page.locator('ts-house-heat-map canvas').first().boundingBox();
    expect(box).not.toBeNull();
    const x = box!.x + 64 + ((box!.width - 80) / 6) * 1.5;
    const y = box!.y + 8 + ((box!.height - 72) / 3) * 2.5;
    await page.mouse.click(x, y);
    await page.getByRole('heading', { name: 'Row 2, tier 1' }).waitFor();
    const words = (await page.getByTestId('silence').textContent()) ?? '';
    // Since when (its last counted egg, on the house's clock) and for how long: it died 30 hours ago.
    expect(words).toMatch(/Counted nothing since .+ \(1 day( \d+ h)?\)/);
    expect(words).toMatch(/not counted since it went silent/);
    // The eggs it missed include at least a whole day's share of a section, never "about 0".
    const missed = Number(/About ([\d,]+) eggs not counted/.exec(words)?.[1]?.replace(/,/g, ''));
    expect(missed).toBeGreaterThan(500);
    await screenshot(page, 'house-live-silent-counter');
    await page.close();
  });

  it("shows a short tier in its cells, measured against the tier's own yardstick", async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 1000 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.getByRole('link', { name: 'Live map of House 3' }).click();
    // The engine's tier exception, outlined beside the cells.
    await page
      .locator('[data-line="tier-3"][data-flagged="true"]')
      .waitFor({ state: 'attached', timeout: 90_000 });
    // Each tier-3 cell is compared with tier-3 peers that are just as short; drawn against the tier's usual
    // share of the house instead, every one reads well below 100 %, and no other tier's does.
    const percentOf = async (tier: number) =>
      page
        .locator(`[data-testid="map-table"] tr[data-tier="${tier}"] td:nth-child(4)`)
        .evaluateAll((cells) => cells.map((c) => Number.parseFloat(c.textContent)));
    const tier3 = await percentOf(3);
    expect(tier3).toHaveLength(6);
    for (const pct of tier3) expect(pct).toBeLessThan(92);
    const tier1 = (await percentOf(1)).sort((a, b) => a - b);
    expect((tier1[2]! + tier1[3]!) / 2).toBeGreaterThan(94);
    await screenshot(page, 'house-live-tier-short');
    await page.setViewportSize({ width: 390, height: 900 });
    await page.waitForTimeout(1000);
    await screenshot(page, 'house-live-tier-short-phone');
    await page.close();
  });

  it('says so when a house does not exist, instead of loading forever', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 390, height: 800 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.waitForURL(/\/farms$/);
    await page.goto(`${harness.baseUrl}/houses/999999`);
    const alert = page.getByRole('alert').filter({ hasText: /not found/i });
    await alert.waitFor();
    expect(await page.getByText('Loading the house map…').count()).toBe(0);
    await screenshot(page, 'house-not-found-phone');
    await page.close();
  });
});
