// Longer than ~350 lines on purpose: the work-order routes' whole life (create, assign, checklist, photos,
// states, roles, CSV) against one test database, each case on its own order.
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { hash } from '@node-rs/argon2';
import { schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { startMailCatcher, type MailCatcher } from '@tierscope/mail-catcher';
import { eq } from 'drizzle-orm';
import request from 'supertest';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  FIXTURE_PASSWORD,
  insertTestException,
  seedFixture,
  type Fixture,
} from '../../testing/fixtures';
import { solidPng } from '../../../../../tests/fixtures/images';
import { bearerFor } from '../../testing/sign-in';
import { createTestApp, createTestRuntime } from '../../testing/test-app';
import type { Runtime } from '../../app';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
let runtime: Runtime;
let catcher: MailCatcher;
let dataDir: string;
let manager: string;
let crew: string;
let otherCrew: string;
let otherCrewId: number;
let integrator: string;
let adminB: string;

const PHOTO_LIMIT = 256 * 1024;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  catcher = await startMailCatcher();
  dataDir = mkdtempSync(join(tmpdir(), 'tierscope-photos-'));
  const config = {
    smtpUrl: `smtp://127.0.0.1:${catcher.smtpPort}`,
    dataDir,
    photoMaxBytes: PHOTO_LIMIT,
  };
  runtime = createTestRuntime(database.db, { config });
  app = createTestApp(database.db, { runtime, config });
  const [second] = await database.db
    .insert(schema.users)
    .values({
      email: 'crew2@farm-a.test',
      name: 'second crew of A',
      passwordHash: await hash(FIXTURE_PASSWORD),
    })
    .returning();
  otherCrewId = second!.id;
  await database.db
    .insert(schema.memberships)
    .values({ userId: otherCrewId, farmId: fixture.farmA, role: 'crew' });
  manager = await bearerFor(app, fixture.usersA.manager.email);
  crew = await bearerFor(app, fixture.usersA.crew.email);
  otherCrew = await bearerFor(app, 'crew2@farm-a.test');
  integrator = await bearerFor(app, fixture.usersA.integrator.email);
  adminB = await bearerFor(app, fixture.adminB.email);
});
afterAll(async () => {
  await runtime.notifier.idle();
  runtime.mailer.close();
  await catcher.close();
  await database.drop();
  rmSync(dataDir, { recursive: true, force: true });
});

async function newOrder(body: Record<string, unknown> = {}) {
  const response = await request(app)
    .post('/api/v1/work-orders')
    .set('Authorization', manager)
    .send({
      houseId: fixture.houseA,
      row: 2,
      tier: 3,
      title: 'Check the drinkers',
      assigneeId: fixture.usersA.crew.id,
      ...body,
    });
  expect(response.status).toBe(201);
  return response.body as { id: number; checklist: { id: number; label: string }[] };
}

describe('opening a work order', () => {
  it('by hand, for a spot, mails the crew member it is assigned to with a link to it', async () => {
    const response = await request(app)
      .post('/api/v1/work-orders')
      .set('Authorization', manager)
      .send({
        houseId: fixture.houseA,
        row: 4,
        tier: 2,
        title: 'Nest curtains torn',
        priority: 'high',
        assigneeId: fixture.usersA.crew.id,
        dueOn: '2026-12-24',
        checklist: ['Replace the curtain', 'Check the nest floor'],
      });
    expect(response.status).toBe(201);
    expect(response.body).toMatchObject({
      houseName: 'A1',
      row: 4,
      tier: 2,
      state: 'open',
      priority: 'high',
      assignee: { id: fixture.usersA.crew.id, name: 'crew of A' },
      createdBy: { id: fixture.usersA.manager.id },
      checklistTotal: 2,
      checklistDone: 0,
      canEdit: true,
    });
    expect(response.body.checklist.map((i: { label: string }) => i.label)).toEqual([
      'Replace the curtain',
      'Check the nest floor',
    ]);
    const mail = await catcher.waitFor((m) => m.subject.includes(`#${response.body.id}`));
    expect(mail.to).toEqual([fixture.usersA.crew.email]);
    expect(mail.subject).toBe(
      `[Tierscope · Farm A] Work order #${response.body.id} for you: Nest curtains torn`,
    );
    expect(mail.text).toContain(`http://tierscope.test/work-orders/${response.body.id}`);
    expect(mail.text).toContain('A1, row 4, tier 2');
    expect(mail.html).toContain(`href="http://tierscope.test/work-orders/${response.body.id}"`);
  });

  it('from an exception, takes its house, spot and likely checks', async () => {
    const exception = await insertTestException(database.db, {
      farmId: fixture.farmA,
      houseId: fixture.houseA,
      scope: 'row',
      row: 3,
    });
    const response = await request(app)
      .post('/api/v1/work-orders')
      .set('Authorization', manager)
      .send({
        houseId: fixture.houseA,
        exceptionId: exception.id,
        title: 'Row 3 short',
        assigneeId: null,
      });
    expect(response.status).toBe(201);
    expect(response.body).toMatchObject({ row: 3, tier: null, exceptionId: exception.id });
    expect(response.body.checklist.map((i: { label: string }) => i.label)).toEqual([
      "This row's feed line (chain, hoppers, feed level)",
      "This row's water line (pressure, drinkers)",
    ]);
    expect(response.body.description).toContain(
      '15 % below expected: 850 eggs where 1,000 were expected',
    );
    expect(response.body.description).not.toContain('p = ');
  });

  it('answers 400 with the field for a missing title, a spot outside the house and a stranger as assignee', async () => {
    const noTitle = await request(app)
      .post('/api/v1/work-orders')
      .set('Authorization', manager)
      .send({ houseId: fixture.houseA, title: '' });
    expect(noTitle.status).toBe(400);
    expect(noTitle.body.error.fields[0].path).toBe('title');
    const outside = await request(app)
      .post('/api/v1/work-orders')
      .set('Authorization', manager)
      .send({ houseId: fixture.houseA, row: 9, title: 'Row nine' });
    expect(outside.status).toBe(400);
    expect(outside.body.error.fields[0]).toEqual({ path: 'row', message: 'A1 has rows 1–4' });
    const stranger = await request(app)
      .post('/api/v1/work-orders')
      .set('Authorization', manager)
      .send({ houseId: fixture.houseA, title: 'For B', assigneeId: fixture.adminB.id });
    expect(stranger.status).toBe(400);
    expect(stranger.body.error.fields[0].path).toBe('assigneeId');
  });

  it('is for managers and admins: crew and integrators get 403, another farm 404, no token 401', async () => {
    const body = { houseId: fixture.houseA, title: 'Not mine to open' };
    for (const bearer of [crew, integrator]) {
      const response = await request(app)
        .post('/api/v1/work-orders')
        .set('Authorization', bearer)
        .send(body);
      expect(response.status).toBe(403);
    }
    const other = await request(app)
      .post('/api/v1/work-orders')
      .set('Authorization', adminB)
      .send(body);
    expect(other.status).toBe(404);
    expect((await request(app).post('/api/v1/work-orders').send(body)).status).toBe(401);
  });
});

describe('working a work order', () => {
  it('lets the crew member it is assigned to see only their own orders', async () => {
    const mine = await newOrder();
    const theirs = await newOrder({ assigneeId: otherCrewId, title: 'For the other crew' });
    const list = await request(app).get('/api/v1/work-orders').set('Authorization', crew);
    expect(list.status).toBe(200);
    const ids = list.body.map((o: { id: number }) => o.id);
    expect(ids).toContain(mine.id);
    expect(ids).not.toContain(theirs.id);
    const peek = await request(app)
      .get(`/api/v1/work-orders/${theirs.id}`)
      .set('Authorization', crew);
    expect(peek.status).toBe(403);
    const all = await request(app).get('/api/v1/work-orders').set('Authorization', manager);
    expect(all.body.map((o: { id: number }) => o.id)).toEqual(
      expect.arrayContaining([mine.id, theirs.id]),
    );
  });

  it('lets the assignee tick the checklist, start, record findings and finish; the opener is mailed', async () => {
    const order = await newOrder({ checklist: ['Flush the drinker line'] });
    const item = order.checklist[0]!;
    const ticked = await request(app)
      .patch(`/api/v1/work-orders/${order.id}/checklist/${item.id}`)
      .set('Authorization', crew)
      .send({ isChecked: true });
    expect(ticked.status).toBe(200);
    expect(ticked.body.checklist[0]).toMatchObject({ isChecked: true, checkedBy: 'crew of A' });
    expect(ticked.body.checklistDone).toBe(1);
    // Ticking the first item of an open order starts it.
    expect(ticked.body.state).toBe('in_progress');
    expect(ticked.body.startedAt).not.toBeNull();

    const started = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', crew)
      .send({ state: 'in_progress' });
    expect(started.body.state).toBe('in_progress');
    expect(started.body.startedAt).not.toBeNull();

    const noFindings = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', crew)
      .send({ state: 'done' });
    expect(noFindings.status).toBe(400);
    expect(noFindings.body.error.fields[0].path).toBe('findingCause');

    const done = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', crew)
      .send({ state: 'done', findingCause: 'water', findingNotes: 'Nipple line blocked at 40 m' });
    expect(done.status).toBe(200);
    expect(done.body).toMatchObject({ state: 'done', findingCause: 'water' });
    expect(done.body.doneAt).not.toBeNull();
    const mail = await catcher.waitFor((m) => m.subject.includes(`#${order.id} done`));
    expect(mail.to).toEqual([fixture.usersA.manager.email]);
    expect(mail.text).toContain('Found: Water: Nipple line blocked at 40 m');

    const audit = await database.db
      .select({ action: schema.auditEvents.action })
      .from(schema.auditEvents)
      .where(eq(schema.auditEvents.entityId, String(order.id)));
    expect(audit.map((a) => a.action)).toEqual(
      expect.arrayContaining([
        'workOrder.create',
        'workOrder.check',
        'workOrder.in_progress',
        'workOrder.done',
      ]),
    );
  });

  it('does not let the crew change the order itself, work another crew member’s order, cancel or reopen', async () => {
    const order = await newOrder();
    const retitle = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', crew)
      .send({ title: 'Something easier' });
    expect(retitle.status).toBe(403);
    const notTheirs = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', otherCrew)
      .send({ state: 'in_progress' });
    expect(notTheirs.status).toBe(403);
    const cancel = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', crew)
      .send({ state: 'cancelled', cancelReason: 'Not needed' });
    expect(cancel.status).toBe(403);
    const unchanged = await request(app)
      .get(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', manager);
    expect(unchanged.body).toMatchObject({ title: 'Check the drinkers', state: 'open' });
  });

  it('lets a manager cancel with a reason and reopen', async () => {
    const order = await newOrder();
    const noReason = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', manager)
      .send({ state: 'cancelled' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields[0].path).toBe('cancelReason');
    const cancelled = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', manager)
      .send({ state: 'cancelled', cancelReason: 'Opened twice' });
    expect(cancelled.body).toMatchObject({ state: 'cancelled', cancelReason: 'Opened twice' });
    const toDone = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', manager)
      .send({ state: 'done', findingCause: 'other' });
    expect(toDone.status).toBe(409);
    const reopened = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', manager)
      .send({ state: 'open' });
    expect(reopened.body).toMatchObject({ state: 'open', cancelReason: null });
  });

  it('closes its exception as fixed when a manager marks it done and asks to', async () => {
    const exception = await insertTestException(database.db, {
      farmId: fixture.farmA,
      houseId: fixture.houseA,
      row: 1,
      tier: 1,
    });
    const order = await newOrder({ exceptionId: exception.id });
    const crewTries = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', crew)
      .send({ state: 'done', findingCause: 'nest', closeException: true });
    expect(crewTries.status).toBe(403);
    const done = await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', manager)
      .send({ state: 'done', findingCause: 'nest', closeException: true });
    expect(done.status).toBe(200);
    expect(done.body.exceptionStatus).toBe('closed');
    const [closed] = await database.db
      .select()
      .from(schema.exceptions)
      .where(eq(schema.exceptions.id, exception.id));
    expect(closed).toMatchObject({ status: 'closed', closeReason: 'fixed' });
    expect(closed!.closeNote).toContain(`Work order #${order.id}`);
  });

  it('hides another farm’s orders: 404 to read or change them', async () => {
    const order = await newOrder();
    expect(
      (await request(app).get(`/api/v1/work-orders/${order.id}`).set('Authorization', adminB))
        .status,
    ).toBe(404);
    expect(
      (
        await request(app)
          .patch(`/api/v1/work-orders/${order.id}`)
          .set('Authorization', adminB)
          .send({ state: 'cancelled', cancelReason: 'Mine now' })
      ).status,
    ).toBe(404);
    const list = await request(app).get('/api/v1/work-orders').set('Authorization', adminB);
    expect(list.body).toEqual([]);
    expect(
      (await request(app).get('/api/v1/work-orders').set('Authorization', integrator)).status,
    ).toBe(403);
  });

  it('filters by state, house and overdue, and exports formula-safe CSV', async () => {
    const late = await newOrder({ title: '=HYPERLINK("x")', dueOn: '2020-01-01' });
    const overdue = await request(app)
      .get('/api/v1/work-orders?overdue=true')
      .set('Authorization', manager);
    expect(overdue.body.map((o: { id: number }) => o.id)).toEqual([late.id]);
    expect(overdue.body[0].isOverdue).toBe(true);
    const done = await request(app)
      .get(`/api/v1/work-orders?state=done&houseId=${fixture.houseA}`)
      .set('Authorization', manager);
    expect(done.body.every((o: { state: string }) => o.state === 'done')).toBe(true);
    const bad = await request(app)
      .get('/api/v1/work-orders?state=finished')
      .set('Authorization', manager);
    expect(bad.status).toBe(400);
    const csv = await request(app)
      .get('/api/v1/work-orders/export.csv?overdue=true')
      .set('Authorization', manager);
    expect(csv.headers['content-type']).toContain('text/csv');
    const lines = csv.text.trim().split('\r\n');
    expect(lines[0]).toBe(
      'id,farm,house,row,tier,title,priority,state,assignee,due,overdue,checklist,created,done',
    );
    // The cell starts with a quote mark, so a spreadsheet shows it as text; its own quotes are doubled.
    expect(lines[1]).toContain(`,"'=HYPERLINK(""x"")",`);
  });
});

describe('photos', () => {
  it('stores a real image, lists it and serves it back to people of that farm only', async () => {
    const order = await newOrder();
    const png = solidPng(4, 3, [200, 120, 40]);
    const upload = await request(app)
      .post(`/api/v1/work-orders/${order.id}/photos`)
      .set('Authorization', crew)
      .attach('photos', png, { filename: 'feeder.png', contentType: 'image/png' });
    expect(upload.status).toBe(201);
    expect(upload.body.photos).toHaveLength(1);
    const photo = upload.body.photos[0];
    expect(photo).toMatchObject({
      originalName: 'feeder.png',
      contentType: 'image/png',
      uploadedBy: 'crew of A',
    });
    const served = await request(app)
      .get(`/api/v1/work-orders/${order.id}/photos/${photo.id}`)
      .set('Authorization', manager)
      .buffer(true);
    expect(served.status).toBe(200);
    expect(served.headers['content-type']).toBe('image/png');
    // Stored decoded and encoded again (nothing but the pixels is kept): the same pixels come back.
    expect(photo.bytes).toBe((served.body as Buffer).length);
    const pixels = async (image: Buffer) =>
      sharp(image).raw().toBuffer({ resolveWithObject: true });
    const [sent, back] = await Promise.all([pixels(png), pixels(served.body as Buffer)]);
    expect(back.info).toMatchObject({ width: 4, height: 3, channels: 3 });
    expect(Buffer.compare(back.data, sent.data)).toBe(0);
    // Kept in the database (any API process serves it), not on this process's disk.
    const kept = await database.db
      .select({ content: schema.workOrderPhotoContents.content })
      .from(schema.workOrderPhotoContents)
      .where(eq(schema.workOrderPhotoContents.photoId, photo.id as number));
    expect(Buffer.compare(kept[0]!.content, served.body as Buffer)).toBe(0);
    expect(existsSync(join(dataDir, 'photos'))).toBe(false);

    const otherFarm = await request(app)
      .get(`/api/v1/work-orders/${order.id}/photos/${photo.id}`)
      .set('Authorization', adminB);
    expect(otherFarm.status).toBe(404);
    const otherCrewMember = await request(app)
      .get(`/api/v1/work-orders/${order.id}/photos/${photo.id}`)
      .set('Authorization', otherCrew);
    expect(otherCrewMember.status).toBe(403);
    expect(
      (await request(app).get(`/api/v1/work-orders/${order.id}/photos/${photo.id}`)).status,
    ).toBe(401);
  });

  it('rejects a file that is not an image even when it is named .jpg, and stores nothing', async () => {
    const order = await newOrder();
    const response = await request(app)
      .post(`/api/v1/work-orders/${order.id}/photos`)
      .set('Authorization', crew)
      .attach('photos', Buffer.from('#!/bin/sh\necho not a photo\n'), {
        filename: 'photo.jpg',
        contentType: 'image/jpeg',
      });
    expect(response.status).toBe(400);
    expect(response.body.error.fields[0].message).toBe(
      'photo.jpg is not a JPEG, PNG or WebP image',
    );
    const detail = await request(app)
      .get(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', crew);
    expect(detail.body.photos).toEqual([]);
  });

  it('rejects a photo over the size limit with 413', async () => {
    const order = await newOrder();
    const big = Buffer.concat([solidPng(1, 1, [0, 0, 0]), Buffer.alloc(PHOTO_LIMIT + 1)]);
    const response = await request(app)
      .post(`/api/v1/work-orders/${order.id}/photos`)
      .set('Authorization', crew)
      .attach('photos', big, { filename: 'huge.png', contentType: 'image/png' });
    expect(response.status).toBe(413);
    expect(response.body.error.message).toContain('at most');
  });
});

describe('GET /api/v1/reports/work-orders', () => {
  it('counts done orders by cause per house and times them from their exception', async () => {
    const exception = await insertTestException(database.db, {
      farmId: fixture.farmA,
      houseId: fixture.houseA,
      row: 2,
      tier: 2,
    });
    const order = await newOrder({ exceptionId: exception.id });
    await request(app)
      .patch(`/api/v1/work-orders/${order.id}`)
      .set('Authorization', manager)
      .send({ state: 'done', findingCause: 'feed' });
    const report = await request(app)
      .get(`/api/v1/reports/work-orders?farmId=${fixture.farmA}`)
      .set('Authorization', manager);
    expect(report.status).toBe(200);
    const house = report.body.houses.find((h: { houseId: number }) => h.houseId === fixture.houseA);
    expect(house.byCause.feed).toBeGreaterThanOrEqual(1);
    expect(house.done).toBeGreaterThanOrEqual(house.fromExceptions);
    expect(house.fromExceptions).toBeGreaterThanOrEqual(1);
    // The test exception opened about an hour before; the order was done just now.
    expect(house.maxHoursToDone).toBeGreaterThan(0.9);
    const crewTries = await request(app)
      .get(`/api/v1/reports/work-orders?farmId=${fixture.farmA}`)
      .set('Authorization', crew);
    expect(crewTries.status).toBe(403);
  });
});
