import { schema } from '@tierscope/db';
import { DEMO_LIGHTS_ON, DEMO_TIMEZONE } from '@tierscope/db/seed';
import { addDays, productionDayOf } from '@tierscope/domain';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeDemoHistory } from '../../scripts/demo-history';
import {
  dialogCloses,
  openedDialog,
  screenshot,
  signIn,
  startHarness,
  type Harness,
} from './harness';

let harness: Harness;
let houseId: number;
/** Two production days before the demo houses' today (on their clock: the UTC date may be a day ahead). */
const lastDay = addDays(productionDayOf(new Date(), DEMO_TIMEZONE, DEMO_LIGHTS_ON), -2);

beforeAll(async () => {
  harness = await startHarness();
  // The demo's invented history: each flock's daily eggs and morning walks since placement.
  await writeDemoHistory(harness.database.db, lastDay);
  const [house] = await harness.database.db
    .select()
    .from(schema.houses)
    .where(eq(schema.houses.name, 'House 2'));
  houseId = house!.id;
}, 120_000);

afterAll(async () => {
  await harness.stop();
});

describe('a manager’s flock and report pages', () => {
  it('shows the flock’s figures and fitted curve, and takes the morning walk', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 1400 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.waitForURL('**/farms');
    await page.goto(`${harness.baseUrl}/houses/${houseId}/flock`);
    const figures = page.getByRole('region', { name: 'Flock figures' });
    await figures.getByText('Hen-day, whole flock').waitFor();
    // How the flock lays now comes first: the last counted day and the last 7 days, in %.
    expect(await page.getByTestId('hen-day-yesterday').textContent()).toMatch(/\d{2}\.\d %/);
    expect(await page.getByTestId('hen-day-week').textContent()).toMatch(/\d{2}\.\d %/);
    // The history's walks end on its last day: the day after has none, and the page says so.
    const dayAfter = addDays(lastDay, 1);
    expect(await page.getByTestId('missing-walks').textContent()).toContain(dayAfter);
    // The demo's history follows a lay curve, so the fit is good (R² well above the 0.8 it must reach).
    await expect
      .poll(async () =>
        Number(/Lay curve\s*R² (\d\.\d\d)/.exec((await figures.textContent()) ?? '')?.[1]),
      )
      .toBeGreaterThan(0.9);
    await page
      .getByRole('img', { name: /with the fitted lay curve/ })
      .locator('canvas')
      .first()
      .waitFor();
    const before = await figures
      .getByText(/^Hens alive/)
      .locator('..')
      .textContent();

    await page.getByLabel('Dead').fill('7');
    await page.getByLabel('Culled').fill('2');
    await page.getByRole('button', { name: 'Save' }).click();
    await page.getByText(/Saved for .*: 7 dead, 2 culled/).waitFor();
    await expect
      .poll(() =>
        figures
          .getByText(/^Hens alive/)
          .locator('..')
          .textContent(),
      )
      .not.toBe(before);
    await screenshot(page, 'flock-1-page');
    await page.close();
  });

  it("lets an administrator set the farm's currency, in which money is then shown", async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'admin@bramblewood.test');
    await page.getByRole('button', { name: 'Farm settings of North Ridge' }).click();
    const dialog = await openedDialog(page);
    await dialog.getByRole('combobox', { name: 'Currency' }).click();
    await page.getByRole('option', { name: 'EUR · Euro' }).click();
    await page.getByRole('listbox').waitFor({ state: 'detached' });
    await screenshot(page, 'farm-settings-dialog');
    await dialog.getByRole('button', { name: 'Save' }).click();
    await dialogCloses(dialog);
    await page.getByText('money in EUR').waitFor();
    await page.close();
  });

  it('gives the daily house report and the farm summary with real figures', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 1400 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.waitForURL('**/farms');
    await page.goto(`${harness.baseUrl}/reports?houseId=${houseId}`);
    await page.getByLabel('Production day').fill(lastDay);
    await page.getByLabel('Production day').dispatchEvent('change');
    const sections = page.getByRole('table', { name: 'Sections' });
    await sections.waitFor();
    // 6 rows × 3 tiers of House 2.
    expect(await sections.getByRole('row').count()).toBe(19);
    const totals = page.getByRole('region', { name: 'House totals' });
    await expect.poll(() => totals.textContent()).toMatch(/Hen-day production\s*\d{2}\.\d %/);
    await screenshot(page, 'reports-1-daily');

    await page.getByRole('tab', { name: 'Farm summary' }).click();
    const houses = page.getByRole('table', { name: 'Houses' });
    await houses.waitFor();
    expect(await houses.getByRole('row', { name: /House 2/ }).textContent()).toMatch(
      /\d{1,3},\d{3}/,
    );
    await page
      .getByRole('img', { name: 'Eggs per production day, by house' })
      .locator('canvas')
      .first()
      .waitFor();
    // The value of eggs lost is in the farm's currency, set above (the demo prices a dozen at 2.40).
    expect((await page.getByTestId('value-lost').textContent())?.trim()).toMatch(
      /^€[\d,]+\.\d{2}$/,
    );
    await screenshot(page, 'reports-2-farm');
    await page.close();
  });
});
