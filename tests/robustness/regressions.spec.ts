import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { startMailCatcher, type MailCatcher } from '@tierscope/mail-catcher';
import { and, eq, isNull, sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Runtime } from '../../apps/api/src/app';
import { seedFixture, type Fixture } from '../../apps/api/src/testing/fixtures';
import { bearerFor } from '../../apps/api/src/testing/sign-in';
import { createTestApp, createTestRuntime } from '../../apps/api/src/testing/test-app';
import { solidPng } from '../fixtures/images';
import { seedFarmObjects, type FarmObjects } from './seed';
import { longMapping } from '../../apps/api/src/testing/imports';

/**
 * One regression test per defect the hardening issue found (items 2–9; item 1 is live-socket.spec.ts and
 * item 7's classes are walked over every route in routes.spec.ts).
 */
let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let runtime: Runtime;
let app: ReturnType<typeof createTestApp>;
let catcher: MailCatcher;
let dataDir: string;
let own: FarmObjects;
let admin: string;
let integrator: string;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  ({ own } = await seedFarmObjects(database.db, fixture));
  catcher = await startMailCatcher();
  dataDir = mkdtempSync(join(tmpdir(), 'tierscope-regressions-'));
  const config = { smtpUrl: `smtp://127.0.0.1:${catcher.smtpPort}`, dataDir };
  runtime = createTestRuntime(database.db, { config });
  app = createTestApp(database.db, { runtime, config });
  admin = await bearerFor(app, fixture.usersA.admin.email);
  integrator = await bearerFor(app, fixture.usersA.integrator.email);
});

afterAll(async () => {
  runtime.imports.dispose();
  runtime.notifier.dispose();
  runtime.mailer.close();
  await catcher.close();
  await database.drop();
  rmSync(dataDir, { recursive: true, force: true });
});

describe('2: a password reset retires the tokens issued before it', () => {
  it('refuses the old token and accepts the one from the new password', async () => {
    const old = await bearerFor(app, fixture.usersA.manager.email);
    expect((await request(app).get('/api/v1/auth/me').set('Authorization', old)).status).toBe(200);
    await request(app).post('/api/v1/auth/forgot').send({ email: fixture.usersA.manager.email });
    const mail = await catcher.waitFor((m) => m.to.includes(fixture.usersA.manager.email));
    const token = /token=([\w-]+)/.exec(mail.text)?.[1];
    const set = await request(app)
      .post('/api/v1/auth/set-password')
      .send({ token, password: 'a completely new password' });
    expect(set.status).toBe(200);
    expect((await request(app).get('/api/v1/auth/me').set('Authorization', old)).status).toBe(401);
    const fresh = `Bearer ${(set.body as { token: string }).token}`;
    expect((await request(app).get('/api/v1/auth/me').set('Authorization', fresh)).status).toBe(
      200,
    );
  });
});

describe('3: a farm admin changes only what belongs to their farms', () => {
  async function personOnBothFarms(): Promise<number> {
    const [person] = await database.db
      .insert(schema.users)
      .values({
        email: `shared-${randomBytes(3).toString('hex')}@farms.test`,
        name: 'Shared person',
        passwordHash: 'x',
      })
      .returning();
    await database.db.insert(schema.memberships).values([
      { userId: person!.id, farmId: fixture.farmA, role: 'crew' },
      { userId: person!.id, farmId: fixture.farmB, role: 'manager' },
    ]);
    return person!.id;
  }

  it('cannot disable or rename a person who also works on another farm', async () => {
    const id = await personOnBothFarms();
    const disable = await request(app)
      .patch(`/api/v1/users/${id}`)
      .set('Authorization', admin)
      .send({ disabled: true });
    expect(disable.status).toBe(403);
    expect(disable.body.error.message).toContain('Remove their role on your farms instead');
    const rename = await request(app)
      .patch(`/api/v1/users/${id}`)
      .set('Authorization', admin)
      .send({ name: 'Renamed' });
    expect(rename.status).toBe(403);
    const [stored] = await database.db.select().from(schema.users).where(eq(schema.users.id, id));
    expect(stored).toMatchObject({ disabled: false, name: 'Shared person' });
  });

  it("takes the person off their own farm, leaving the other farm's role", async () => {
    const id = await personOnBothFarms();
    const removed = await request(app)
      .patch(`/api/v1/users/${id}`)
      .set('Authorization', admin)
      .send({ memberships: [] });
    expect(removed.status).toBe(200);
    const left = await database.db
      .select()
      .from(schema.memberships)
      .where(eq(schema.memberships.userId, id));
    expect(left).toEqual([expect.objectContaining({ farmId: fixture.farmB, role: 'manager' })]);
  });

  it('an admin of every farm the person is on may disable them', async () => {
    const id = await personOnBothFarms();
    await database.db
      .insert(schema.memberships)
      .values({ userId: fixture.usersA.admin.id, farmId: fixture.farmB, role: 'admin' });
    try {
      const bothAdmin = await bearerFor(app, fixture.usersA.admin.email);
      const disable = await request(app)
        .patch(`/api/v1/users/${id}`)
        .set('Authorization', bothAdmin)
        .send({ disabled: true });
      expect(disable.status).toBe(200);
      expect(disable.body.disabled).toBe(true);
    } finally {
      await database.db
        .delete(schema.memberships)
        .where(
          and(
            eq(schema.memberships.userId, fixture.usersA.admin.id),
            eq(schema.memberships.farmId, fixture.farmB),
          ),
        );
    }
  });

  it("lists only people of the admin's farms, with only those farms' roles", async () => {
    const list = await request(app).get('/api/v1/users').set('Authorization', admin);
    expect(list.status).toBe(200);
    const users = list.body as { id: number; memberships: { farmId: number }[] }[];
    expect(users.some((u) => u.id === fixture.adminB.id)).toBe(false);
    expect(users.flatMap((u) => u.memberships).every((m) => m.farmId === fixture.farmA)).toBe(true);
  });
});

describe('4: one bad reading never loses the good ones beside it', () => {
  it('rejects a NUL in a counter id and a year-0000 time by index, and stores the rest', async () => {
    const ts = new Date(Date.now() - 3600_000).toISOString();
    const response = await request(app)
      .post('/api/v1/ingest/readings')
      .set('Authorization', `Bearer ${own.gatewayKey}`)
      .send({
        readings: [
          { counter: `H${own.houseId}-R1-T1`, ts, eggs: 40 },
          { counter: 'bad\u0000id', ts, eggs: 5 },
          { counter: `H${own.houseId}-R1-T2`, ts: '0000-01-01T00:00:00Z', eggs: 5 },
          { counter: `H${own.houseId}-R1-T2`, ts: '\ud800', eggs: 5 },
          { counter: `H${own.houseId}-R2-T1`, ts, eggs: 41 },
        ],
      });
    expect(response.status).toBe(200);
    expect(response.body.accepted).toBe(2);
    expect(response.body.rejected.map((r: { index: number }) => r.index)).toEqual([1, 2, 3]);
    expect(response.body.rejected[0].reason).toContain('NUL');
    const stored = await database.db.execute<{ eggs: number }>(
      sql`select coalesce(sum(eggs), 0)::int as eggs from readings where farm_id = ${fixture.farmA}`,
    );
    expect(stored.rows[0]?.eggs).toBe(81);
  });
});

describe('5: a gateway cannot block making a house', () => {
  it("adopts the unknown counters whose ids a new house's counters take, with their readings", async () => {
    // The next house id, as its default counter ids will name it.
    const next = await database.db.execute<{ id: number }>(
      sql`select last_value + 1 as id from houses_id_seq`,
    );
    const nextId = Number(next.rows[0]?.id);
    const ts = new Date(Date.now() - 2 * 3600_000).toISOString();
    const posted = await request(app)
      .post('/api/v1/ingest/readings')
      .set('Authorization', `Bearer ${own.gatewayKey}`)
      .send({
        readings: [
          { counter: `H${nextId}-R1-T1`, ts, eggs: 70 },
          { counter: `H${nextId}-COLLECTOR`, ts, eggs: 70 },
        ],
      });
    expect(posted.body.unmappedCounters).toEqual([`H${nextId}-COLLECTOR`, `H${nextId}-R1-T1`]);
    const created = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .send({
        name: 'Gateway first',
        rows: 1,
        tiers: 1,
        timezone: 'UTC',
        lightsOn: '04:00',
        photoperiodHours: 16,
      });
    expect(created.status).toBe(201);
    expect(created.body.id).toBe(nextId);
    expect(created.body.counters.map((c: { externalId: string }) => c.externalId).sort()).toEqual([
      `H${nextId}-COLLECTOR`,
      `H${nextId}-R1-T1`,
    ]);
    const unmapped = await database.db
      .select()
      .from(schema.counters)
      .where(and(eq(schema.counters.farmId, fixture.farmA), isNull(schema.counters.houseId)));
    expect(unmapped).toEqual([]);
    // The held readings are rolled up into the new house's day.
    const sections = await database.db.execute<{ eggs: number }>(
      sql`select coalesce(sum(r.eggs), 0)::int as eggs from section_day_rollups r
          join sections s on s.id = r.section_id where s.house_id = ${nextId}`,
    );
    expect(sections.rows[0]?.eggs).toBe(70);
    const collector = await database.db.execute<{ eggs: number }>(
      sql`select coalesce(sum(eggs), 0)::int as eggs from collector_day_rollups where house_id = ${nextId}`,
    );
    expect(collector.rows[0]?.eggs).toBe(70);
  });
});

describe('6: an import never hangs on what a file holds', () => {
  const mapping = JSON.stringify(longMapping('UTC', 'ts'));

  async function upload(content: Buffer, name = 'export.csv') {
    return request(app)
      .post(`/api/v1/houses/${own.houseId}/imports`)
      .set('Authorization', integrator)
      .field('mapping', mapping)
      .attach('file', content, { filename: name, contentType: 'text/csv' });
  }

  async function finished(id: number) {
    await runtime.imports.idle();
    const [row] = await database.db.select().from(schema.imports).where(eq(schema.imports.id, id));
    return row!;
  }

  it('refuses random bytes at once with 415, and keeps no file', async () => {
    const before = readdirSync(join(dataDir, 'imports'));
    const response = await upload(randomBytes(50_000));
    expect(response.status).toBe(415);
    expect(response.body.error.message).toContain('not a text (CSV) export');
    expect(readdirSync(join(dataDir, 'imports'))).toEqual(before);
  });

  it('reports a NUL in one cell as that line’s error and loads the other lines', async () => {
    const day = new Date(Date.now() - 3 * 86_400_000).toISOString().slice(0, 10);
    const csv = `ts,row,tier,eggs\n${day}T06:00:00Z,1,1,10\n${day}T07:00:00Z,1,1,1\u00001\n${day}T08:00:00Z,1,1,12\n`;
    const response = await upload(Buffer.from(csv));
    expect(response.status).toBe(202);
    const row = await finished(response.body.id as number);
    expect(row).toMatchObject({ state: 'done', readingsAdded: 2, errorCount: 1 });
    const errors = await database.db
      .select()
      .from(schema.importErrors)
      .where(eq(schema.importErrors.importId, row.id));
    expect(errors).toHaveLength(1);
    expect(errors[0]!.line).toBe(3);
    expect(errors[0]!.message).not.toContain('\u0000');
  });

  it('ends (failed, with a clean message) when its header quotes a NUL back', async () => {
    const response = await upload(
      Buffer.from('t\u0000s,row,tier,eggs\n2026-11-01T06:00:00Z,1,1,4\n'),
    );
    expect(response.status).toBe(202);
    const row = await finished(response.body.id as number);
    expect(row.state).toBe('failed');
    expect(row.message).toContain('is not in the header');
    expect(row.message).not.toContain('\u0000');
    // Nothing left to run again at the next start.
    const left = await database.db
      .select()
      .from(schema.imports)
      .where(sql`${schema.imports.state} in ('queued', 'running')`);
    expect(left).toEqual([]);
  });

  it('cuts a 1 MiB line to a short message instead of storing it whole', async () => {
    const csv = `ts,row,tier,eggs\n${'x'.repeat(1024 * 1024)},1,1,3\n`;
    const response = await upload(Buffer.from(csv));
    expect(response.status).toBe(202);
    const row = await finished(response.body.id as number);
    expect(['done', 'failed']).toContain(row.state);
    const errors = await database.db
      .select()
      .from(schema.importErrors)
      .where(eq(schema.importErrors.importId, row.id));
    for (const text of [row.message ?? '', ...errors.map((e) => e.message)]) {
      expect(text.length).toBeLessThanOrEqual(500);
    }
    const status = await request(app)
      .get(`/api/v1/imports/${row.id}`)
      .set('Authorization', integrator);
    expect(status.status).toBe(200);
    expect(status.text.length).toBeLessThan(20_000);
  });

  it('refuses a NUL in an uploaded file name as a malformed form, and queues nothing', async () => {
    const before = await database.db.select().from(schema.imports);
    const response = await upload(Buffer.from('ts,row,tier,eggs\n'), 'ex\u0000port.csv');
    expect(response.status).toBe(400);
    expect(response.body.error.message).toBe('The upload is not a valid multipart form');
    expect(await database.db.select().from(schema.imports)).toHaveLength(before.length);
  });
});

describe('7: broken multipart bodies are 400, never 500', () => {
  const targets = () => [
    `/api/v1/houses/${own.houseId}/imports`,
    `/api/v1/work-orders/${own.workOrderId}/photos`,
  ];
  const cases: { name: string; type: string; body: string }[] = [
    { name: 'no boundary', type: 'multipart/form-data', body: '--x\r\n\r\nhello\r\n--x--' },
    {
      name: 'a body cut short',
      type: 'multipart/form-data; boundary=x',
      body: '--x\r\nContent-Disposition: form-data; name="file"; filename="a.csv"\r\n\r\nts,eggs\r\n1,',
    },
    {
      name: 'a part without headers',
      type: 'multipart/form-data; boundary=x',
      body: '--x\r\n\r\nhello\r\n--x--\r\n',
    },
    {
      name: 'a NUL in the file name',
      type: 'multipart/form-data; boundary=x',
      body: '--x\r\nContent-Disposition: form-data; name="photos"; filename="a\u0000.png"\r\nContent-Type: image/png\r\n\r\nnot a png\r\n--x--\r\n',
    },
  ];
  it.each(cases)('$name', async ({ type, body }) => {
    for (const url of targets()) {
      const response = await request(app)
        .post(url)
        .set('Authorization', admin)
        .set('Content-Type', type)
        .send(body);
      expect(response.status, url).toBeGreaterThanOrEqual(400);
      expect(response.status, url).toBeLessThan(500);
    }
  });
});

describe('8: a reset request answers before looking the address up', () => {
  it('answers while the mail for a known address is still being made', async () => {
    let release: () => void = () => undefined;
    const gate = new Promise<void>((resolve) => {
      release = resolve;
    });
    const original = runtime.notifier.passwordReset.bind(runtime.notifier);
    let isCalled = false;
    runtime.notifier.passwordReset = async (userId) => {
      isCalled = true;
      await gate;
      return original(userId);
    };
    try {
      const response = await request(app)
        .post('/api/v1/auth/forgot')
        .send({ email: fixture.usersA.crew.email });
      // Answered although the look-up and mail have not finished (they wait on the gate).
      expect(response.status).toBe(202);
      await new Promise((resolve) => setTimeout(resolve, 50));
      expect(isCalled).toBe(true);
    } finally {
      release();
      runtime.notifier.passwordReset = original;
    }
    await catcher.waitFor((m) => m.to.includes(fixture.usersA.crew.email));
  });
});

describe('9: photos are decoded whole before they are kept', () => {
  async function attach(content: Buffer) {
    return request(app)
      .post(`/api/v1/work-orders/${own.workOrderId}/photos`)
      .set('Authorization', admin)
      .attach('photos', content, { filename: 'feeder.png', contentType: 'image/png' });
  }

  it('refuses a PNG cut short', async () => {
    const png = solidPng(64, 64, [10, 200, 30]);
    const response = await attach(png.subarray(0, png.length - 30));
    expect(response.status).toBe(400);
    expect(response.body.error.message).toContain('could not be read');
  });

  it('refuses a PNG signature followed by HTML', async () => {
    const fake = Buffer.concat([
      Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
      Buffer.from('<html><script>alert(1)</script></html>'),
    ]);
    expect((await attach(fake)).status).toBe(400);
  });

  it('keeps a whole PNG, without what was appended after its end', async () => {
    const png = solidPng(8, 8, [200, 10, 10]);
    const response = await attach(Buffer.concat([png, Buffer.from('<script>x</script>')]));
    expect(response.status).toBe(201);
    const photo = (response.body.photos as { id: number; originalName: string }[]).at(-1)!;
    const served = await request(app)
      .get(`/api/v1/work-orders/${own.workOrderId}/photos/${photo.id}`)
      .set('Authorization', admin)
      .buffer(true);
    expect((served.body as Buffer).includes(Buffer.from('<script>'))).toBe(false);
  });
});
