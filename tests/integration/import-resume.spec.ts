import { mkdtempSync, rmSync, writeFileSync, openAsBlob } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { hash } from '@node-rs/argon2';
import { insertHouseWithLayout, schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signInThroughApi, startApiProcess, type ApiProcess } from '../../scripts/processes';
import { importForm } from '../../apps/api/src/testing/imports';

/**
 * A large import, the API process killed (SIGKILL) half-way, the API started again: the import is picked
 * up on start, run again from the start, and every reading of the file is in the database exactly once.
 */
const LINES = 120_000;
let database: Awaited<ReturnType<typeof createTestDatabase>>;
let dir: string;
let api: ApiProcess | null = null;
let houseId: number;

const env = () => ({
  DATABASE_URL: database.url,
  JWT_SECRET: 'resume-secret-resume-secret-resume-secret-0',
  DATA_DIR: join(dir, 'data'),
});

beforeAll(async () => {
  database = await createTestDatabase();
  dir = mkdtempSync(join(tmpdir(), 'tierscope-resume-'));
  const [farm] = await database.db.insert(schema.farms).values({ name: 'Resume Farm' }).returning();
  const house = await insertHouseWithLayout(database.db, farm!.id, {
    name: 'House 1',
    rows: 10,
    tiers: 4,
    timezone: 'America/Chicago',
    lightsOn: '04:00',
    photoperiodHours: 16,
    shortfallThresholdPct: 10,
  });
  houseId = house.id;
  const [user] = await database.db
    .insert(schema.users)
    .values({
      email: 'int@resume.test',
      name: 'Integrator',
      passwordHash: await hash('resume-pass'),
    })
    .returning();
  await database.db
    .insert(schema.memberships)
    .values({ userId: user!.id, farmId: farm!.id, role: 'integrator' });
  const lines = ['timestamp,row,tier,eggs'];
  for (let i = 0; i < LINES; i++) {
    const section = i % 40;
    const ts = new Date(Date.UTC(2026, 7, 1) + Math.floor(i / 40) * 300_000).toISOString();
    lines.push(`${ts},${Math.floor(section / 4) + 1},${(section % 4) + 1},${i % 17}`);
  }
  writeFileSync(join(dir, 'export.csv'), lines.join('\n') + '\n');
}, 60_000);

afterAll(async () => {
  await api?.stop();
  await database.drop();
  rmSync(dir, { recursive: true, force: true });
});

describe('an import interrupted by a killed API', () => {
  it('finishes after a restart and counts every reading once', async () => {
    api = await startApiProcess(env());
    const login = await signInThroughApi(api.baseUrl, 'int@resume.test', 'resume-pass');
    const form = importForm(await openAsBlob(join(dir, 'export.csv')));
    const started = await fetch(`${api.baseUrl}/api/v1/houses/${houseId}/imports`, {
      method: 'POST',
      headers: { authorization: `Bearer ${login.token}` },
      body: form,
    });
    expect(started.status).toBe(202);
    const { id } = (await started.json()) as { id: number };

    // Kill it as soon as some readings are in, but not all.
    const countIn = async () =>
      (
        await database.db.execute<{ n: number }>(
          sql`SELECT count(*)::int AS n FROM readings r JOIN counters c ON c.id = r.counter_id WHERE c.house_id = ${houseId}`,
        )
      ).rows[0]!.n;
    const deadline = Date.now() + 60_000;
    let before = 0;
    while (before === 0 && Date.now() < deadline) {
      before = await countIn();
      await new Promise((r) => setTimeout(r, 20));
    }
    process.kill(-api.child.pid!, 'SIGKILL');
    await new Promise((resolve) => api!.child.once('exit', resolve));
    api = null;
    expect(before).toBeGreaterThan(0);
    expect(before).toBeLessThan(LINES);
    const [halfway] = await database.db
      .select({ state: schema.imports.state })
      .from(schema.imports)
      .where(sql`${schema.imports.id} = ${id}`);
    expect(halfway!.state).toBe('running');

    api = await startApiProcess(env());
    const again = await signInThroughApi(api.baseUrl, 'int@resume.test', 'resume-pass');
    let status: { state: string; readingsAdded: number; duplicates: number; linesRead: number };
    for (;;) {
      const response = await fetch(`${api.baseUrl}/api/v1/imports/${id}`, {
        headers: { authorization: `Bearer ${again.token}` },
      });
      status = (await response.json()) as typeof status;
      if (status.state !== 'running' && status.state !== 'queued') break;
      if (Date.now() > deadline + 60_000) throw new Error('the resumed import did not end');
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(status.state).toBe('done');
    expect(status.linesRead).toBe(LINES);
    // What the first run committed is found again, not added again.
    expect(status.readingsAdded + status.duplicates).toBe(LINES);
    expect(status.duplicates).toBeGreaterThanOrEqual(before);
    const totals = await database.db.execute<{ n: number; eggs: number; rolled: number }>(sql`
      SELECT (SELECT count(*)::int FROM readings r JOIN counters c ON c.id = r.counter_id WHERE c.house_id = ${houseId}) AS n,
             (SELECT sum(r.eggs)::int FROM readings r JOIN counters c ON c.id = r.counter_id WHERE c.house_id = ${houseId}) AS eggs,
             (SELECT sum(d.eggs)::int FROM section_day_rollups d JOIN sections s ON s.id = d.section_id WHERE s.house_id = ${houseId}) AS rolled`);
    const expectedEggs = Array.from({ length: LINES }, (_, i) => i % 17).reduce((a, b) => a + b, 0);
    expect(totals.rows[0]).toEqual({ n: LINES, eggs: expectedEggs, rolled: expectedEggs });
  }, 120_000); // the restarted process takes the import over once the killed one's lease runs out (15 s)
});
