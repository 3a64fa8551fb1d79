import { schema } from '@tierscope/db';
import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { solidPng } from '../fixtures/images';
import { screenshot, signIn, startHarness, type Harness, openedDialog } from './harness';

let harness: Harness;
let exceptionId: number;

beforeAll(async () => {
  harness = await startHarness();
  const db = harness.database.db;
  const [farm] = await db.select().from(schema.farms).where(eq(schema.farms.name, 'North Ridge'));
  const [house] = await db
    .select()
    .from(schema.houses)
    .where(and(eq(schema.houses.farmId, farm!.id), eq(schema.houses.name, 'House 2')));
  // The exception the shortfall engine raises for a feed-line fault on a whole row.
  const openedAt = new Date(Date.now() - 5 * 3600_000);
  const [exception] = await db
    .insert(schema.exceptions)
    .values({
      farmId: farm!.id,
      houseId: house!.id,
      kind: 'shortfall',
      scope: 'row',
      row: 4,
      openedAt,
      openedDay: openedAt.toISOString().slice(0, 10),
      eggs: 5423,
      expected: 6541,
      ratio: 0.829,
      pValue: 1e-40,
      worstRatio: 0.82,
      atOpen: {},
      lastEvaluatedAt: new Date(),
    })
    .returning();
  exceptionId = exception!.id;
}, 120_000);

afterAll(async () => {
  await harness.stop();
});

describe('a flagged row handed to the crew', () => {
  let workOrderId = 0;

  it('a manager opens a work order from the exception and assigns it to the crew member', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'manager@bramblewood.test');
    await page.waitForURL('**/farms');
    // The new-exception mail went to the farm's manager.
    const alert = await harness.mail.waitFor((m) => m.subject.includes('New exception in House 2'));
    expect(alert.to).toEqual(['manager@bramblewood.test']);
    expect(alert.subject).toBe('[Tierscope · North Ridge] New exception in House 2');

    await page.goto(`${harness.baseUrl}/exceptions`);
    const row = page.getByRole('row', { name: /House 2.*Row 4 \(all tiers\)/ });
    await row.getByRole('button', { name: /Work order/ }).click();
    const dialog = await openedDialog(page);
    await expect
      .poll(() => dialog.getByLabel('Title').inputValue())
      .toBe('Low lay: House 2, row 4 (all tiers)');
    await dialog.getByLabel('Assign to').click();
    await page.getByRole('option', { name: 'Casey Crew (crew)' }).click();
    await dialog.getByLabel('Priority').click();
    await page.getByRole('option', { name: 'High' }).click();
    await screenshot(page, 'work-order-1-new-from-exception');
    await dialog.getByRole('button', { name: 'Open work order' }).click();
    await page.waitForURL(/\/work-orders\/\d+$/);
    workOrderId = Number(/\/work-orders\/(\d+)$/.exec(page.url())?.[1]);
    await expect
      .poll(() => page.getByRole('heading', { level: 1 }).textContent())
      .toContain(`#${workOrderId} · Low lay: House 2, row 4 (all tiers)`);
    // The safety cautions and the deferral to local rules are on every work order: the first one above
    // the checklist, all of them unfolded right after it.
    const cautions = page.locator('details.safety[open]');
    await cautions.getByText('Lock out and tag out first').waitFor();
    await page.getByText("site's own safety procedures").waitFor();
    expect(await page.getByRole('checkbox').count()).toBeGreaterThanOrEqual(2);
    await screenshot(page, 'work-order-2-opened');
    // Back on the list, the exception links its work order instead of offering a second one.
    await page.goto(`${harness.baseUrl}/exceptions`);
    const listed = page.getByRole('row', { name: /House 2.*Row 4 \(all tiers\)/ });
    await listed.getByRole('link', { name: `#${workOrderId}` }).waitFor();
    expect(await listed.getByRole('button', { name: /Work order/ }).count()).toBe(0);
    await page.close();

    const assigned = await harness.mail.waitFor((m) =>
      m.subject.includes(`#${workOrderId} for you`),
    );
    expect(assigned.to).toEqual(['crew@bramblewood.test']);
    expect(assigned.text).toContain(`/work-orders/${workOrderId}`);
  });

  it('the crew member works it on a phone: My work, tick, findings, done', async () => {
    const page = await harness.browser.newPage({
      viewport: { width: 360, height: 740 },
      isMobile: true,
      hasTouch: true,
    });
    await signIn(page, harness.baseUrl, 'crew@bramblewood.test');
    await page.waitForURL('**/farms');
    await page.getByRole('button', { name: 'Open navigation' }).click();
    await page.getByRole('link', { name: 'My work' }).click();
    const card = page.getByRole('link', { name: /Low lay: House 2, row 4/ });
    await card.waitFor();
    await screenshot(page, 'work-order-3-my-work-phone');
    // Big touch targets: a card is at least 48 px tall.
    expect((await card.boundingBox())?.height).toBeGreaterThanOrEqual(48);
    await card.click();
    await page.waitForURL(`**/work-orders/${workOrderId}`);

    const first = page.getByRole('checkbox').first();
    await first.check();
    await expect.poll(() => page.getByText(/Casey Crew, \d+ \w+, \d\d:\d\d/).count()).toBe(1);
    await page.getByLabel('Cause').click();
    await page.getByRole('option', { name: 'Feed' }).click();
    await page.getByLabel('Notes').fill('Feed chain off its sprocket at the far end; refitted.');
    await page.locator('input[type=file]').setInputFiles({
      name: 'sprocket.png',
      mimeType: 'image/png',
      buffer: solidPng(64, 48, [90, 110, 60]),
    });
    await page.getByRole('img', { name: 'Photo sprocket.png' }).waitFor();
    // Nothing on the page is wider than the phone.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
      360,
    );
    await screenshot(page, 'work-order-4-findings-phone');
    await page.getByRole('button', { name: 'Mark done' }).click();
    await expect.poll(() => page.getByTestId('state').textContent()).toBe('Done');
    await page.getByText('Feed chain off its sprocket').waitFor();
    await screenshot(page, 'work-order-5-done-phone');
    // Back to My work: nothing left to do, and the order is under Done.
    await page.getByRole('link', { name: 'My work' }).first().click();
    await page.getByText('Nothing assigned to you. Enjoy the quiet.').waitFor();
    await page.locator('mat-button-toggle', { hasText: 'Done' }).click();
    await page.getByRole('link', { name: /Low lay: House 2, row 4/ }).waitFor();
    await page.close();

    const [stored] = await harness.database.db
      .select()
      .from(schema.workOrders)
      .where(eq(schema.workOrders.id, workOrderId));
    expect(stored).toMatchObject({ state: 'done', findingCause: 'feed', exceptionId });
  });

  it('the mails are in the admin’s Mailbox', async () => {
    await harness.mail.waitFor((m) => m.subject.includes(`#${workOrderId} done`));
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, harness.baseUrl, 'admin@bramblewood.test');
    await page.waitForURL('**/farms');
    await page.getByRole('link', { name: 'Mailbox' }).click();
    const panel = (text: string) => page.getByRole('button', { name: new RegExp(text) });
    await panel(`Work order #${workOrderId} done`).waitFor();
    await panel(`Work order #${workOrderId} for you`).waitFor();
    await panel('New exception in House 2').first().waitFor();
    await panel(`Work order #${workOrderId} done`).click();
    await page.getByText('Found: Feed: Feed chain off its sprocket').waitFor();
    await screenshot(page, 'work-order-6-mailbox');
    await page.close();
  });
});
