import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createTestDatabase } from '@tierscope/db/testing';
import { addDays } from '@tierscope/domain';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Runtime } from '../../app';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor } from '../../testing/sign-in';
import { createTestApp, createTestRuntime } from '../../testing/test-app';
import { longMapping } from '../../testing/imports';

/**
 * An import of a house's past, older than the two months live catch-up looks back: its days are replayed
 * through the shortfall engine, so the summary can show what the history would have flagged.
 */
let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
let runtime: Runtime;
let dataDir: string;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  dataDir = mkdtempSync(join(tmpdir(), 'tierscope-import-eval-'));
  runtime = createTestRuntime(database.db, { isEvaluating: true, config: { dataDir } });
  app = createTestApp(database.db, { runtime, config: { dataDir } });
});
afterAll(async () => {
  await runtime.imports.idle();
  await runtime.scheduler.idle();
  runtime.scheduler.dispose();
  await database.drop();
  rmSync(dataDir, { recursive: true, force: true });
});

describe('after importing old history', () => {
  it('replays the imported days and opens the exception the history shows', async () => {
    // Fourteen days, 80 to 67 days ago, every section laying 60 eggs an hour for 12 hours; row 2 lays
    // 20 % less on the last five days (a feed-line fault, common practice's "more than 10 % below").
    const today = new Date().toISOString().slice(0, 10);
    const first = addDays(today, -80);
    const lines = ['timestamp,row,tier,eggs'];
    for (let d = 0; d < 14; d++) {
      const day = addDays(first, d);
      for (let h = 0; h < 12; h++) {
        // 05:00 to 16:00 local (America/Chicago, lights on at 04:00) written in UTC.
        const ts = new Date(Date.parse(`${day}T00:00:00Z`) + (11 + h) * 3_600_000).toISOString();
        for (let row = 1; row <= 4; row++) {
          for (let tier = 1; tier <= 3; tier++) {
            const eggs = row === 2 && d >= 9 ? 48 : 60;
            lines.push(`${ts},${row},${tier},${eggs}`);
          }
        }
      }
    }
    const integrator = await bearerFor(app, fixture.usersA.integrator.email);
    const started = await request(app)
      .post(`/api/v1/houses/${fixture.houseA}/imports`)
      .set('Authorization', integrator)
      .field('mapping', JSON.stringify(longMapping('America/Chicago')))
      .attach('file', Buffer.from(lines.join('\n')), 'history.csv');
    expect(started.status).toBe(202);
    await runtime.imports.idle();
    // Done, but its days not yet judged: the import and the house's map both say so.
    const justDone = await request(app)
      .get(`/api/v1/imports/${started.body.id}`)
      .set('Authorization', integrator);
    expect(justDone.body).toMatchObject({ state: 'done', isJudgingDays: true });
    const map = await request(app)
      .get(`/api/v1/houses/${fixture.houseA}/map`)
      .set('Authorization', integrator);
    expect(map.body.isJudgingPastDays).toBe(true);
    // The engine waits for a quiet moment, then replays day by day.
    await new Promise((resolve) => setTimeout(resolve, 3500));
    await runtime.scheduler.idle();
    const judged = await request(app)
      .get(`/api/v1/imports/${started.body.id}`)
      .set('Authorization', integrator);
    expect(judged.body.isJudgingDays).toBe(false);
    const mapAfter = await request(app)
      .get(`/api/v1/houses/${fixture.houseA}/map`)
      .set('Authorization', integrator);
    expect(mapAfter.body.isJudgingPastDays).toBe(false);

    const exceptions = await request(app)
      .get(`/api/v1/exceptions?houseId=${fixture.houseA}`)
      .set('Authorization', integrator);
    const rowTwo = exceptions.body.find(
      (e: { kind: string; scope: string; row: number | null }) =>
        e.kind === 'shortfall' && e.scope === 'row' && e.row === 2,
    );
    expect(rowTwo).toBeDefined();
    expect(rowTwo.openedAt.slice(0, 10) >= addDays(first, 9)).toBe(true);
    expect(rowTwo.ratio).toBeLessThan(0.9);
  }, 120_000);
});
