import { writeFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { schema } from '@tierscope/db';
import { and, eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { screenshot, signIn, startHarness, type Harness } from './harness';

let harness: Harness;
let dir: string;
let file: string;
const GOOD_LINES = 30 * 16 * 18;

beforeAll(async () => {
  harness = await startHarness();
  dir = mkdtempSync(join(tmpdir(), 'tierscope-e2e-import-'));
  // A controller export as such files come: semicolons, day-first local times, decimal commas, CRLF.
  const lines = ['Zeit;Reihe;Etage;Eier'];
  for (let day = 0; day < 30; day++) {
    for (let hour = 0; hour < 16; hour++) {
      for (let row = 1; row <= 6; row++) {
        for (let tier = 1; tier <= 3; tier++) {
          const date = new Date(Date.UTC(2026, 8, 1 + day));
          const dd = String(date.getUTCDate()).padStart(2, '0');
          const mm = String(date.getUTCMonth() + 1).padStart(2, '0');
          const eggs = 40 + ((day * 7 + hour * 13 + row * 5 + tier) % 90);
          lines.push(
            `${dd}.${mm}.2026 ${String(4 + hour).padStart(2, '0')}:00;${row};${tier};${eggs},0`,
          );
        }
      }
    }
  }
  lines.splice(3, 0, '31.02.2026 05:00;1;1;120,0');
  lines.splice(10, 0, '01.09.2026 05:00;9;1;120,0');
  file = join(dir, 'house-1-september.csv');
  writeFileSync(file, lines.join('\r\n') + '\r\n');
}, 120_000);

afterAll(async () => {
  await harness.stop();
  rmSync(dir, { recursive: true, force: true });
});

describe('an integrator imports a counter export', () => {
  it('maps it against the preview, watches it import, and sees the summary with the bad lines', async () => {
    const page = await harness.browser.newPage({ viewport: { width: 1280, height: 1000 } });
    await signIn(page, harness.baseUrl, 'integrator@bramblewood.test');
    await page.waitForURL('**/farms');
    await page.getByRole('link', { name: 'Imports' }).click();
    // A select opens only once it has options: wait for the farm's houses (the first is chosen by itself).
    await page
      .getByRole('combobox', { name: 'House' })
      .getByText(/House 1/)
      .waitFor();
    await page.getByRole('combobox', { name: 'House' }).click();
    await page.getByRole('option', { name: /House 1/ }).click();
    await page.getByTestId('import-file').setInputFiles(file);

    // What was found by itself: the semicolon, the decimal comma, the columns by their names.
    await page.getByText('Found: semicolon').waitFor();
    await expect
      .poll(() => page.getByRole('combobox', { name: 'Time column' }).textContent())
      .toContain('Zeit');
    await expect
      .poll(() => page.getByRole('combobox', { name: 'Count column' }).textContent())
      .toContain('Eier');
    // The date order is a choice the file cannot settle alone here: say it is day first.
    await page.getByRole('combobox', { name: 'Time format' }).click();
    await page.getByRole('option', { name: /Day first/ }).click();
    await page.getByRole('table', { name: 'Preview of the first lines' }).waitFor();
    await screenshot(page, 'import-1-mapping');

    await page.getByLabel('Save this mapping as').fill('Controller CSV');
    await page.getByRole('button', { name: 'Save mapping' }).click();
    await page.getByText('Mapping "Controller CSV" saved').waitFor();

    await page.getByRole('button', { name: 'Import into House 1' }).click();
    const progress = page.getByRole('region', { name: /Import of house-1-september\.csv/ });
    await progress.waitFor();
    await screenshot(page, 'import-2-progress');
    await expect
      .poll(() => progress.getByTestId('import-state').textContent(), { timeout: 60_000 })
      .toBe('Imported');
    expect(await progress.getByTestId('readings-added').textContent()).toBe(
      GOOD_LINES.toLocaleString('en-US'),
    );
    const errors = page.getByRole('table', { name: 'Lines not imported' });
    await errors.waitFor();
    // Line 4 and line 11 of the file (the header is line 1).
    await errors.getByRole('row', { name: /^4 Zeit .*not a real date/ }).waitFor();
    await errors
      .getByRole('row', { name: /^11 Reihe\/Etage row 9, tier 1 is not a section/ })
      .waitFor();
    // Until the engine has judged the imported days, the summary says so; then it points to what they flagged.
    await progress.getByTestId('judging').waitFor();
    await screenshot(page, 'import-3-summary');
    await progress.getByTestId('judged').waitFor({ timeout: 60_000 });
    expect(await progress.getByTestId('judging').count()).toBe(0);
    await page.close();

    const db = harness.database.db;
    const [house] = await db.select().from(schema.houses).where(eq(schema.houses.name, 'House 1'));
    const stored = await db.execute<{ n: number }>(sql`
      SELECT count(*)::int AS n FROM readings r JOIN counters c ON c.id = r.counter_id
      WHERE c.house_id = ${house!.id}`);
    expect(stored.rows[0]!.n).toBe(GOOD_LINES);
    const saved = await db
      .select()
      .from(schema.importMappings)
      .where(
        and(
          eq(schema.importMappings.farmId, house!.farmId),
          eq(schema.importMappings.name, 'Controller CSV'),
        ),
      );
    expect(saved).toHaveLength(1);
  });
});
