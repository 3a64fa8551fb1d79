// Longer than ~350 lines on purpose: every import case (layouts, clocks, bad lines, retries, cancel, mappings)
// against one test database; the upload set-up is shared by all of them.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Runtime } from '../../app';
import { createEventBus, type DomainEvents } from '../../platform/events';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor } from '../../testing/sign-in';
import { createTestApp, createTestRuntime } from '../../testing/test-app';
import { longMapping } from '../../testing/imports';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
let runtime: Runtime;
let dataDir: string;
let integrator: string;
const accepted: DomainEvents['readings.accepted'][] = [];

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  dataDir = mkdtempSync(join(tmpdir(), 'tierscope-imports-'));
  const events = createEventBus();
  events.on('readings.accepted', (e) => accepted.push(e));
  const config = { dataDir, importMaxBytes: 256 * 1024 };
  runtime = createTestRuntime(database.db, { config, events });
  app = createTestApp(database.db, { runtime, config });
  integrator = await bearerFor(app, fixture.usersA.integrator.email);
});
afterAll(async () => {
  await runtime.imports.idle();
  await database.drop();
  rmSync(dataDir, { recursive: true, force: true });
});

/** Each test imports into a house of its own, so their readings never meet. */
async function newHouse(): Promise<{ id: number; counter: (row: number, tier: number) => string }> {
  const response = await request(app)
    .post(`/api/v1/farms/${fixture.farmA}/houses`)
    .set('Authorization', await bearerFor(app, fixture.usersA.admin.email))
    .send({
      name: `Import ${Math.random().toString(36).slice(2, 8)}`,
      rows: 3,
      tiers: 2,
      timezone: 'America/Chicago',
      lightsOn: '04:00',
      photoperiodHours: 16,
    });
  expect(response.status).toBe(201);
  const id = response.body.id as number;
  return { id, counter: (row, tier) => `H${id}-R${row}-T${tier}` };
}

async function runImport(
  houseId: number,
  content: string | Buffer,
  mapping: Record<string, unknown>,
  bearer = integrator,
  fileName = 'export.csv',
) {
  const response = await request(app)
    .post(`/api/v1/houses/${houseId}/imports`)
    .set('Authorization', bearer)
    .field('mapping', JSON.stringify(mapping))
    .attach('file', Buffer.isBuffer(content) ? content : Buffer.from(content), fileName);
  if (response.status !== 202) return { response, status: null };
  await runtime.imports.idle();
  const status = await request(app)
    .get(`/api/v1/imports/${response.body.id}`)
    .set('Authorization', bearer);
  return { response, status: status.body };
}

/** Eggs stored for a house: raw readings and the section day rollup, which must agree. */
async function storedEggs(houseId: number) {
  const raw = await database.db.execute<{ eggs: number; n: number }>(sql`
    SELECT coalesce(sum(r.eggs), 0)::int AS eggs, count(*)::int AS n
    FROM readings r JOIN counters c ON c.id = r.counter_id WHERE c.house_id = ${houseId}`);
  const rolled = await database.db.execute<{ eggs: number }>(sql`
    SELECT coalesce(sum(d.eggs), 0)::int AS eggs FROM section_day_rollups d
    JOIN sections s ON s.id = d.section_id WHERE s.house_id = ${houseId}`);
  return { eggs: raw.rows[0]!.eggs, readings: raw.rows[0]!.n, rolledUp: rolled.rows[0]!.eggs };
}

const longIso = { ...longMapping('America/Chicago'), mode: 'interval' };

describe('importing a long export (one reading per line)', () => {
  it('lands every reading once, with its rollups, and asks for the days to be evaluated', async () => {
    const house = await newHouse();
    const csv = [
      'timestamp,row,tier,eggs',
      '2026-10-01T05:00:00-05:00,1,1,120',
      '2026-10-01T05:00:00-05:00,1,2,110',
      '2026-10-01T06:00:00-05:00,1,1,130',
      '2026-10-01T06:00:00-05:00,2,1,125',
      '2026-10-02T05:00:00-05:00,3,2,90',
      '2026-10-02T06:00:00-05:00,3,2,95',
    ].join('\n');
    const { response, status } = await runImport(house.id, csv, longIso);
    expect(response.status).toBe(202);
    expect(response.body.state).toBe('queued');
    expect(status).toMatchObject({
      state: 'done',
      linesRead: 6,
      readingsAdded: 6,
      duplicates: 0,
      errorCount: 0,
      errors: [],
      firstTs: '2026-10-01T10:00:00.000Z',
      lastTs: '2026-10-02T11:00:00.000Z',
    });
    expect(await storedEggs(house.id)).toEqual({ eggs: 670, readings: 6, rolledUp: 670 });
    const event = accepted.find((e) => e.houseId === house.id);
    expect(event?.firstTs.toISOString()).toBe('2026-10-01T10:00:00.000Z');
  });

  it('adds nothing when the same file is imported again', async () => {
    const house = await newHouse();
    const csv =
      'timestamp,row,tier,eggs\n2026-10-03T05:00:00Z,1,1,50\n2026-10-03T06:00:00Z,1,1,60\n';
    await runImport(house.id, csv, longIso);
    const { status } = await runImport(house.id, csv, longIso);
    expect(status).toMatchObject({ state: 'done', readingsAdded: 0, duplicates: 2 });
    expect(await storedEggs(house.id)).toEqual({ eggs: 110, readings: 2, rolledUp: 110 });
  });

  it('reads semicolons (found by itself), decimal commas, counter ids and day-first local times', async () => {
    const house = await newHouse();
    const csv = [
      'Zeit;Zähler;Eier',
      `01.10.2026 04:30;${house.counter(2, 2)};1.204,0`,
      `01.10.2026 05:30;${house.counter(2, 2)};98,0`,
    ].join('\n');
    const { status } = await runImport(house.id, csv, {
      layout: 'long',
      decimal: ',',
      timestamp: 'Zeit',
      timestampFormat: 'dmy',
      timezone: 'America/Chicago',
      counter: 'Zähler',
      eggs: 'Eier',
    });
    expect(status).toMatchObject({ state: 'done', readingsAdded: 2, errorCount: 0 });
    const rows = await database.db
      .select({ ts: schema.readings.ts, eggs: schema.readings.eggs })
      .from(schema.readings)
      .innerJoin(schema.counters, eq(schema.counters.id, schema.readings.counterId))
      .where(eq(schema.counters.houseId, house.id))
      .orderBy(schema.readings.ts);
    // 04:30 CDT (UTC−5 on 1 October) is 09:30 UTC.
    expect(rows.map((r) => [r.ts.toISOString(), r.eggs])).toEqual([
      ['2026-10-01T09:30:00.000Z', 1204],
      ['2026-10-01T10:30:00.000Z', 98],
    ]);
  });

  it('reads a tab file without a header by column number, month-first, as running totals with a reset', async () => {
    const house = await newHouse();
    const id = house.counter(1, 1);
    const csv = [
      `10/05/2026 05:00\t${id}\t100`,
      `10/05/2026 06:00\t${id}\t130`,
      `10/05/2026 07:00\t${id}\t10`,
      `10/05/2026 08:00\t${id}\t25`,
    ].join('\n');
    const { status } = await runImport(house.id, csv, {
      layout: 'long',
      hasHeader: false,
      timestamp: 1,
      timestampFormat: 'mdy',
      timezone: 'America/Chicago',
      counter: 2,
      eggs: 3,
      mode: 'total',
    });
    expect(status).toMatchObject({ state: 'done', readingsAdded: 4, errorCount: 0 });
    const rows = await database.db
      .select({ eggs: schema.readings.eggs, total: schema.readings.total })
      .from(schema.readings)
      .innerJoin(schema.counters, eq(schema.counters.id, schema.readings.counterId))
      .where(eq(schema.counters.houseId, house.id))
      .orderBy(schema.readings.ts);
    // The first total is the baseline; a total that goes down is a reset, counted from zero.
    expect(rows.map((r) => [r.eggs, r.total])).toEqual([
      [0, 100],
      [30, 130],
      [10, 10],
      [15, 25],
    ]);
  });

  it('reports running totals out of time order instead of guessing', async () => {
    const house = await newHouse();
    const id = house.counter(1, 2);
    const csv = `ts,counter,total\n2026-10-06T06:00Z,${id},50\n2026-10-06T05:00Z,${id},40\n`;
    const { status } = await runImport(house.id, csv, {
      layout: 'long',
      timestamp: 'ts',
      timezone: 'UTC',
      counter: 'counter',
      eggs: 'total',
      mode: 'total',
    });
    expect(status.errors).toEqual([
      {
        line: 3,
        column: 'total',
        message: 'running totals must be in time order for each counter',
      },
    ]);
  });
});

describe('importing a wide export (one column per counter)', () => {
  it('maps each column to its counter or section and skips empty cells', async () => {
    const house = await newHouse();
    const csv = [
      'time,belt A,belt B,notes',
      '2026-10-07 05:00,40,41,fine',
      '2026-10-07 06:00,,44,belt A stopped',
    ].join('\r\n');
    const { status } = await runImport(house.id, csv, {
      layout: 'wide',
      timestamp: 'time',
      timezone: 'America/Chicago',
      columns: [
        { column: 'belt A', counter: house.counter(1, 1) },
        { column: 'belt B', row: 3, tier: 2 },
      ],
    });
    expect(status).toMatchObject({ state: 'done', linesRead: 2, readingsAdded: 3, errorCount: 0 });
    expect((await storedEggs(house.id)).eggs).toBe(125);
  });

  it('refuses a column mapped to a counter the house does not have', async () => {
    const house = await newHouse();
    const { status } = await runImport(house.id, 'time,x\n2026-10-07 05:00,1\n', {
      layout: 'wide',
      timestamp: 'time',
      timezone: 'UTC',
      columns: [{ column: 'x', counter: 'NOT-HERE' }],
    });
    expect(status).toMatchObject({
      state: 'failed',
      message: 'Counter "NOT-HERE" is not a counter of this house',
    });
  });
});

describe('RFC 4180 files', () => {
  const mapping = { ...longIso, timezone: 'UTC' };
  /** Imports `body` (after the header) into a house of its own and answers the status and the eggs stored. */
  async function importLines(body: string, header = 'timestamp,row,tier,eggs,note\r\n') {
    const house = await newHouse();
    const { status } = await runImport(house.id, header + body, mapping);
    return { status, eggs: (await storedEggs(house.id)).eggs };
  }

  it('takes a quoted field holding the delimiter (RFC 4180 §2.6)', async () => {
    const { status, eggs } = await importLines('2026-10-08T05:00Z,1,1,10,"with, comma"\r\n');
    expect(status).toMatchObject({ readingsAdded: 1, errorCount: 0 });
    expect(eggs).toBe(10);
  });

  it('takes doubled quotes inside a quoted field (RFC 4180 §2.7)', async () => {
    const { status } = await importLines('2026-10-08T06:00Z,1,1,11,"said ""hello"""\r\n');
    expect(status).toMatchObject({ readingsAdded: 1, errorCount: 0 });
  });

  it('takes a line break inside a quoted field (RFC 4180 §2.6)', async () => {
    const { status } = await importLines(
      '2026-10-08T07:00Z,1,1,12,"two\r\nlines"\r\n2026-10-08T08:00Z,1,1,13,x\r\n',
    );
    expect(status).toMatchObject({ linesRead: 2, readingsAdded: 2, errorCount: 0 });
  });

  it('takes quoted counts and times, and empty quoted fields (RFC 4180 §2.5)', async () => {
    const { status, eggs } = await importLines('"2026-10-08T09:00Z","1","1","14",""\r\n');
    expect(status).toMatchObject({ readingsAdded: 1, errorCount: 0 });
    expect(eggs).toBe(14);
  });

  it('takes a byte-order mark before the header', async () => {
    const { status } = await importLines(
      '2026-10-08T05:00Z,1,1,10,x\n',
      '\uFEFFtimestamp,row,tier,eggs,note\n',
    );
    expect(status).toMatchObject({ state: 'done', readingsAdded: 1, errorCount: 0 });
  });

  it('takes CRLF and LF line ends alike, and a last line without one (RFC 4180 §2.1–2.2)', async () => {
    const { status } = await importLines(
      '2026-10-08T05:00Z,1,1,10,x\r\n2026-10-08T06:00Z,1,1,10,x\n2026-10-08T07:00Z,1,1,10,x',
    );
    expect(status).toMatchObject({ linesRead: 3, readingsAdded: 3, errorCount: 0 });
  });

  it('numbers lines as the file does, after a field that spans two lines', async () => {
    const house = await newHouse();
    const csv =
      'timestamp,row,tier,eggs,note\n' +
      '2026-10-09T05:00Z,1,1,10,"spans\ntwo lines"\n' +
      '2026-10-09T06:00Z,1,1,eleven,x\n';
    const { status } = await runImport(house.id, csv, mapping);
    expect(status.errors).toEqual([
      { line: 4, column: 'eggs', message: '"eleven" is not a number' },
    ]);
  });
});

describe('bad lines', () => {
  it('lands the good lines and reports every bad one with its line number and column', async () => {
    const house = await newHouse();
    const csv = [
      'timestamp,row,tier,eggs',
      '2026-10-10T05:00Z,1,1,10',
      '2026-13-10T05:00Z,1,1,10',
      '2026-10-10T06:00Z,1,1,-4',
      '2026-10-10T06:00Z,9,1,10',
      '2026-10-10T07:00Z,1',
      '2026-10-10T08:00Z,2,2,12.5',
      '2099-01-01T00:00Z,1,1,10',
      '2026-10-10T09:00Z,2,2,20',
    ].join('\n');
    const { status } = await runImport(house.id, csv, { ...longIso, timezone: 'UTC' });
    expect(status).toMatchObject({ state: 'done', linesRead: 8, readingsAdded: 2, errorCount: 6 });
    expect(status.errors).toEqual([
      { line: 3, column: 'timestamp', message: '"2026-13-10T05:00Z" is not a real date and time' },
      { line: 4, column: 'eggs', message: '-4 is negative' },
      { line: 5, column: 'row/tier', message: 'row 9, tier 1 is not a section of this house' },
      { line: 6, column: 'row/tier', message: 'row 1, tier ? is not a section of this house' },
      { line: 7, column: 'eggs', message: '12.5 is not a whole number of eggs' },
      { line: 8, column: 'timestamp', message: '2099-01-01T00:00Z is in the future' },
    ]);
    expect((await storedEggs(house.id)).eggs).toBe(30);
    const csvErrors = await request(app)
      .get(`/api/v1/imports/${status.id}/errors.csv`)
      .set('Authorization', integrator);
    expect(csvErrors.headers['content-type']).toContain('text/csv');
    const lines = csvErrors.text.trim().split('\r\n');
    expect(lines[0]).toBe('line,column,message');
    expect(lines).toHaveLength(7);
    // A message that starts with "-" is written formula-safe.
    expect(lines[2]).toBe(`4,eggs,'-4 is negative`);
  });

  it('fails the import, keeping nothing, when a mapped column is not in the header', async () => {
    const house = await newHouse();
    const { status } = await runImport(house.id, 'when,row,tier,eggs\n2026-10-10T05:00Z,1,1,1\n', {
      ...longIso,
    });
    expect(status.state).toBe('failed');
    expect(status.message).toBe(
      'The timestamp column "timestamp" is not in the header (when, row, tier, eggs)',
    );
    expect((await storedEggs(house.id)).readings).toBe(0);
  });
});

describe('an import that stopped half-way', () => {
  it('is run again from the start when the API starts, and counts every reading once', async () => {
    const house = await newHouse();
    const lines = Array.from(
      { length: 40 },
      (_, i) =>
        `2026-10-11T${String(5 + Math.floor(i / 6)).padStart(2, '0')}:${String((i % 6) * 10).padStart(2, '0')}Z,${(i % 3) + 1},${(i % 2) + 1},${10 + i}`,
    );
    const header = 'timestamp,row,tier,eggs';
    // What the first run committed before the process was killed: the first chunk of lines.
    await runImport(house.id, [header, ...lines.slice(0, 15)].join('\n'), {
      ...longIso,
      timezone: 'UTC',
    });
    // The interrupted import as the kill left it: its file kept, its row still "running".
    mkdirSync(join(dataDir, 'imports'), { recursive: true });
    const storedName = `resumed-${house.id}.csv`;
    writeFileSync(join(dataDir, 'imports', storedName), [header, ...lines].join('\n'));
    const [row] = await database.db
      .insert(schema.imports)
      .values({
        farmId: fixture.farmA,
        houseId: house.id,
        storedName,
        fileName: 'big.csv',
        bytes: 2000,
        mapping: {
          ...longIso,
          timezone: 'UTC',
          decimal: '.',
          hasHeader: true,
          timestampFormat: 'iso',
        },
        state: 'running',
        linesRead: 15,
        readingsAdded: 15,
        startedAt: new Date(),
      })
      .returning();
    expect(await runtime.imports.resumeInterrupted()).toBeGreaterThanOrEqual(1);
    await runtime.imports.idle();
    const status = await request(app)
      .get(`/api/v1/imports/${row!.id}`)
      .set('Authorization', integrator);
    expect(status.body).toMatchObject({
      state: 'done',
      linesRead: 40,
      readingsAdded: 25,
      duplicates: 15,
    });
    const expected = lines.reduce((sum, _, i) => sum + 10 + i, 0);
    expect(await storedEggs(house.id)).toEqual({
      eggs: expected,
      readings: 40,
      rolledUp: expected,
    });
  });
});

describe('who may import', () => {
  const csv = 'timestamp,row,tier,eggs\n2026-10-12T05:00Z,1,1,1\n';
  it('is integrators and admins of the house’s farm only', async () => {
    const house = await newHouse();
    for (const role of ['manager', 'crew'] as const) {
      const { response } = await runImport(
        house.id,
        csv,
        longIso,
        await bearerFor(app, fixture.usersA[role].email),
      );
      expect(response.status).toBe(403);
    }
    const admin = await runImport(
      house.id,
      csv,
      longIso,
      await bearerFor(app, fixture.usersA.admin.email),
    );
    expect(admin.response.status).toBe(202);
    const otherFarm = await runImport(
      house.id,
      csv,
      longIso,
      await bearerFor(app, fixture.adminB.email),
    );
    expect(otherFarm.response.status).toBe(404);
    const peek = await request(app)
      .get(`/api/v1/imports/${admin.status.id}`)
      .set('Authorization', await bearerFor(app, fixture.adminB.email));
    expect(peek.status).toBe(404);
    const noToken = await request(app)
      .post(`/api/v1/houses/${house.id}/imports`)
      .attach('file', Buffer.from(csv), 'x.csv');
    expect(noToken.status).toBe(401);
  });

  it('answers 400 for a missing file, bad JSON and an incomplete mapping, and 413 for a file too large', async () => {
    const house = await newHouse();
    const noFile = await request(app)
      .post(`/api/v1/houses/${house.id}/imports`)
      .set('Authorization', integrator)
      .field('mapping', JSON.stringify(longIso));
    expect(noFile.status).toBe(400);
    expect(noFile.body.error.fields[0].path).toBe('file');
    const badJson = await request(app)
      .post(`/api/v1/houses/${house.id}/imports`)
      .set('Authorization', integrator)
      .field('mapping', '{layout:')
      .attach('file', Buffer.from(csv), 'x.csv');
    expect(badJson.status).toBe(400);
    expect(badJson.body.error.message).toBe('The mapping is not valid JSON');
    const withoutEggs: Partial<typeof longIso> = { ...longIso };
    delete withoutEggs.eggs;
    const incomplete = await runImport(house.id, csv, withoutEggs);
    expect(incomplete.response.status).toBe(400);
    expect(incomplete.response.body.error.fields.map((f: { path: string }) => f.path)).toContain(
      'eggs',
    );
    const both = await runImport(house.id, csv, { ...longIso, counter: 'c' });
    expect(both.response.status).toBe(400);
    const big = await runImport(house.id, Buffer.alloc(300 * 1024, 'a'), longIso);
    expect(big.response.status).toBe(413);
  });
});

describe('cancelling', () => {
  it('cancels a queued import at once, and says when an import has already ended', async () => {
    const house = await newHouse();
    const [queued] = await database.db
      .insert(schema.imports)
      .values({
        farmId: fixture.farmA,
        houseId: house.id,
        storedName: 'never-started.csv',
        fileName: 'later.csv',
        bytes: 10,
        mapping: { ...longIso, decimal: '.', hasHeader: true, timestampFormat: 'iso' },
      })
      .returning();
    const cancelled = await request(app)
      .post(`/api/v1/imports/${queued!.id}/cancel`)
      .set('Authorization', integrator);
    expect(cancelled.status).toBe(200);
    expect(cancelled.body.state).toBe('cancelled');
    const again = await request(app)
      .post(`/api/v1/imports/${queued!.id}/cancel`)
      .set('Authorization', integrator);
    expect(again.status).toBe(409);
  });
});

describe('saved mappings', () => {
  it('are kept by name per farm, replaced when saved again, and deleted', async () => {
    const path = `/api/v1/farms/${fixture.farmA}/import-mappings`;
    const first = await request(app)
      .post(path)
      .set('Authorization', integrator)
      .send({ name: 'Controller export', mapping: longIso });
    expect(first.status).toBe(201);
    const second = await request(app)
      .post(path)
      .set('Authorization', integrator)
      .send({ name: 'Controller export', mapping: { ...longIso, timezone: 'Europe/Amsterdam' } });
    expect(second.body.id).toBe(first.body.id);
    const list = await request(app).get(path).set('Authorization', integrator);
    expect(list.body).toHaveLength(1);
    expect(list.body[0].mapping.timezone).toBe('Europe/Amsterdam');
    const manager = await request(app)
      .get(path)
      .set('Authorization', await bearerFor(app, fixture.usersA.manager.email));
    expect(manager.status).toBe(403);
    const bad = await request(app)
      .post(path)
      .set('Authorization', integrator)
      .send({ name: 'x', mapping: { ...longIso, timezone: 'Mars/Olympus' } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields[0].message).toBe('Give an IANA time zone such as America/Chicago');
    const gone = await request(app)
      .delete(`/api/v1/import-mappings/${first.body.id}`)
      .set('Authorization', integrator);
    expect(gone.status).toBe(204);
  });
});

describe('running a failed import again', () => {
  it('re-queues a failed import with its kept file, and refuses anything else', async () => {
    const house = await newHouse();
    const csv = 'timestamp,row,tier,eggs\n2026-10-13T05:00Z,1,1,5\n2026-10-13T06:00Z,1,1,6\n';
    const storedName = `retry-${house.id}.csv`;
    mkdirSync(join(dataDir, 'imports'), { recursive: true });
    // The file is missing on the first run (a disk that was not mounted yet, say): the run fails.
    const [row] = await database.db
      .insert(schema.imports)
      .values({
        farmId: fixture.farmA,
        houseId: house.id,
        storedName,
        fileName: 'retry.csv',
        bytes: csv.length,
        mapping: {
          ...longIso,
          // A delimiter given, so the run opens the file straight away (no sample read first).
          delimiter: ',',
          timezone: 'UTC',
          decimal: '.',
          hasHeader: true,
          timestampFormat: 'iso',
        },
      })
      .returning();
    runtime.imports.enqueue(row!.id);
    await runtime.imports.idle();
    const failed = await request(app)
      .get(`/api/v1/imports/${row!.id}`)
      .set('Authorization', integrator);
    expect(failed.body.state).toBe('failed');

    writeFileSync(join(dataDir, 'imports', storedName), csv);
    const retried = await request(app)
      .post(`/api/v1/imports/${row!.id}/retry`)
      .set('Authorization', integrator);
    expect(retried.status).toBe(200);
    await runtime.imports.idle();
    const done = await request(app)
      .get(`/api/v1/imports/${row!.id}`)
      .set('Authorization', integrator);
    expect(done.body).toMatchObject({ state: 'done', readingsAdded: 2 });
    const again = await request(app)
      .post(`/api/v1/imports/${row!.id}/retry`)
      .set('Authorization', integrator);
    expect(again.status).toBe(409);
  });
});
