import { schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { startMailCatcher, type MailCatcher } from '@tierscope/mail-catcher';
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import type { Runtime } from '../../app';
import { insertTestException, seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor } from '../../testing/sign-in';
import { createTestApp, createTestRuntime } from '../../testing/test-app';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
let runtime: Runtime;
let catcher: MailCatcher;
let admin: string;
let manager: string;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  catcher = await startMailCatcher();
  const config = {
    smtpUrl: `smtp://127.0.0.1:${catcher.smtpPort}`,
    mailCatcherUrl: catcher.httpUrl,
  };
  runtime = createTestRuntime(database.db, { config });
  app = createTestApp(database.db, { runtime, config });
  admin = await bearerFor(app, fixture.usersA.admin.email);
  manager = await bearerFor(app, fixture.usersA.manager.email);
});
beforeEach(async () => {
  // Each test reads only the mail it caused.
  await runtime.notifier.idle();
  catcher.clear();
});
afterAll(async () => {
  await runtime.notifier.idle();
  runtime.mailer.close();
  await catcher.close();
  await database.drop();
});

/** The token from a set-password link in a mail's text. */
function tokenIn(text: string): string {
  const match = /\/set-password\?token=([A-Za-z0-9_-]+)/.exec(text);
  if (!match?.[1]) throw new Error(`no set-password link in: ${text}`);
  return match[1];
}

describe('mail about new exceptions', () => {
  it('sends the farm’s managers one mail per house for the live exceptions past learning, once', async () => {
    const shortfall = await insertTestException(database.db, {
      farmId: fixture.farmA,
      houseId: fixture.houseA,
      row: 2,
      tier: 1,
    });
    await insertTestException(database.db, {
      farmId: fixture.farmA,
      houseId: fixture.houseA,
      kind: 'silent_counter',
      row: 3,
      tier: 2,
    });
    await insertTestException(database.db, {
      farmId: fixture.farmA,
      houseId: fixture.houseA,
      row: 4,
      tier: 3,
      isLearning: true,
    });
    await insertTestException(database.db, {
      farmId: fixture.farmA,
      houseId: fixture.houseA,
      row: 1,
      tier: 3,
      status: 'closed',
    });
    expect(await runtime.notifier.flushExceptions()).toBe(1);
    const mails = catcher.messages();
    expect(mails).toHaveLength(1);
    const mail = mails[0]!;
    expect(mail.to).toEqual([fixture.usersA.manager.email]);
    expect(mail.subject).toBe('[Tierscope · Farm A] 2 new exceptions in A1');
    expect(mail.text).toContain(
      'Shortfall at row 2, tier 1: 15 % below expected: 850 eggs where 1,000 were expected',
    );
    expect(mail.text).toContain('Silent counter at row 3, tier 2');
    expect(mail.text).not.toContain('row 4, tier 3');
    expect(mail.text).toContain(`http://tierscope.test/exceptions?houseId=${fixture.houseA}`);
    expect(mail.html).toContain('Likely checks');

    // A second flush finds nothing new: no exception is mailed twice.
    expect(await runtime.notifier.flushExceptions()).toBe(0);
    const [stamped] = await database.db
      .select({ notifiedAt: schema.exceptions.notifiedAt })
      .from(schema.exceptions)
      .where(eq(schema.exceptions.id, shortfall.id));
    expect(stamped?.notifiedAt).not.toBeNull();
  });

  it('respects a manager who turned these mails off, and comes back when turned on', async () => {
    const off = await request(app)
      .put('/api/v1/me/notifications')
      .set('Authorization', manager)
      .send({ newExceptions: false });
    expect(off.status).toBe(200);
    expect(off.body).toEqual({
      newExceptions: false,
      workOrderAssigned: true,
      workOrderDone: true,
    });
    await insertTestException(database.db, {
      farmId: fixture.farmA,
      houseId: fixture.houseA,
      scope: 'tier',
      tier: 2,
    });
    expect(await runtime.notifier.flushExceptions()).toBe(0);
    expect(catcher.messages()).toEqual([]);
    const on = await request(app)
      .put('/api/v1/me/notifications')
      .set('Authorization', manager)
      .send({ newExceptions: true });
    expect(on.body.newExceptions).toBe(true);
    const read = await request(app).get('/api/v1/me/notifications').set('Authorization', manager);
    expect(read.body.newExceptions).toBe(true);
  });

  it('never mails a disabled manager', async () => {
    await database.db
      .update(schema.users)
      .set({ disabled: true })
      .where(eq(schema.users.id, fixture.usersA.manager.id));
    try {
      await insertTestException(database.db, {
        farmId: fixture.farmA,
        houseId: fixture.houseA,
        row: 3,
        tier: 3,
      });
      expect(await runtime.notifier.flushExceptions()).toBe(0);
      expect(catcher.messages()).toEqual([]);
    } finally {
      await database.db
        .update(schema.users)
        .set({ disabled: false })
        .where(eq(schema.users.id, fixture.usersA.manager.id));
    }
  });

  it('rejects a settings change that is not a boolean', async () => {
    const response = await request(app)
      .put('/api/v1/me/notifications')
      .set('Authorization', manager)
      .send({ newExceptions: 'sometimes' });
    expect(response.status).toBe(400);
    expect(response.body.error.fields[0].path).toBe('newExceptions');
  });
});

describe('password reset', () => {
  it('answers the same whether or not the address has an account', async () => {
    const unknown = await request(app)
      .post('/api/v1/auth/forgot')
      .send({ email: 'nobody@farm-a.test' });
    const known = await request(app)
      .post('/api/v1/auth/forgot')
      .send({ email: fixture.usersA.crew.email });
    expect(unknown.status).toBe(202);
    expect(known.status).toBe(202);
    expect(unknown.body).toEqual(known.body);
    // The look-up and the mail happen after the answer (so its timing tells nothing): wait for the mail.
    await catcher.waitFor((m) => m.to.includes(fixture.usersA.crew.email));
    await runtime.notifier.idle();
    const mails = catcher.messages();
    expect(mails).toHaveLength(1);
    expect(mails[0]!.to).toEqual([fixture.usersA.crew.email]);
    expect(mails[0]!.subject).toBe('[Tierscope] Reset your password');
  });

  it('sets a new password through the mailed link once, and signs the user in', async () => {
    await request(app).post('/api/v1/auth/forgot').send({ email: fixture.usersA.crew.email });
    const mail = await catcher.waitFor((m) => m.to.includes(fixture.usersA.crew.email));
    const token = tokenIn(mail.text);
    expect(mail.text).toContain('http://tierscope.test/set-password?token=');
    const set = await request(app)
      .post('/api/v1/auth/set-password')
      .send({ token, password: 'a brand new password' });
    expect(set.status).toBe(200);
    expect(set.body.user.email).toBe(fixture.usersA.crew.email);
    expect(set.body.token).toEqual(expect.any(String));
    const login = await request(app)
      .post('/api/v1/auth/login')
      .send({ email: fixture.usersA.crew.email, password: 'a brand new password' });
    expect(login.status).toBe(200);
    const again = await request(app)
      .post('/api/v1/auth/set-password')
      .send({ token, password: 'yet another password' });
    expect(again.status).toBe(400);
    expect(again.body.error.message).toContain('expired or was already used');
  });

  it('refuses an expired link and a link replaced by a newer one', async () => {
    await request(app).post('/api/v1/auth/forgot').send({ email: fixture.usersA.integrator.email });
    const first = tokenIn((await catcher.waitFor(() => true)).text);
    catcher.clear();
    await request(app).post('/api/v1/auth/forgot').send({ email: fixture.usersA.integrator.email });
    const second = tokenIn((await catcher.waitFor(() => true)).text);
    const replaced = await request(app)
      .post('/api/v1/auth/set-password')
      .send({ token: first, password: 'password from old link' });
    expect(replaced.status).toBe(400);
    await database.db
      .update(schema.userTokens)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(schema.userTokens.userId, fixture.usersA.integrator.id));
    const expired = await request(app)
      .post('/api/v1/auth/set-password')
      .send({ token: second, password: 'password from late link' });
    expect(expired.status).toBe(400);
  });

  it('sends nothing to a disabled user', async () => {
    await database.db
      .update(schema.users)
      .set({ disabled: true })
      .where(eq(schema.users.id, fixture.usersA.integrator.id));
    const response = await request(app)
      .post('/api/v1/auth/forgot')
      .send({ email: fixture.usersA.integrator.email });
    expect(response.status).toBe(202);
    await runtime.notifier.idle();
    expect(catcher.messages()).toEqual([]);
  });

  it('validates the request', async () => {
    const response = await request(app)
      .post('/api/v1/auth/forgot')
      .send({ email: 'not-an-address' });
    expect(response.status).toBe(400);
    const short = await request(app)
      .post('/api/v1/auth/set-password')
      .send({ token: 'x'.repeat(43), password: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.error.fields[0].path).toBe('password');
  });
});

describe('invitations', () => {
  it('mails a new user without a password a single-use link, and only that link opens the account', async () => {
    const created = await request(app)
      .post('/api/v1/users')
      .set('Authorization', admin)
      .send({
        email: 'newcomer@farm-a.test',
        name: 'Newcomer',
        memberships: [{ farmId: fixture.farmA, role: 'crew' }],
      });
    expect(created.status).toBe(201);
    const mail = await catcher.waitFor((m) => m.to.includes('newcomer@farm-a.test'));
    expect(mail.subject).toBe('[Tierscope · Farm A] You are invited to Tierscope');
    expect(mail.text).toContain('admin of A added you to Tierscope for Farm A');
    const token = tokenIn(mail.text);
    const set = await request(app)
      .post('/api/v1/auth/set-password')
      .send({ token, password: 'my own first password' });
    expect(set.status).toBe(200);
    expect(set.body.memberships).toEqual([
      { farmId: fixture.farmA, farmName: 'Farm A', role: 'crew' },
    ]);
    const login = await request(app)
      .post('/api/v1/auth/login')
      .send({ email: 'newcomer@farm-a.test', password: 'my own first password' });
    expect(login.status).toBe(200);
  });

  it('does not mail a user created with a password', async () => {
    await request(app)
      .post('/api/v1/users')
      .set('Authorization', admin)
      .send({
        email: 'withpassword@farm-a.test',
        name: 'Has one',
        password: 'given by the admin',
        memberships: [{ farmId: fixture.farmA, role: 'crew' }],
      });
    await runtime.notifier.idle();
    expect(catcher.messages()).toEqual([]);
  });
});

describe('GET /api/v1/dev/mailbox', () => {
  it('lists what the local catcher caught, for admins only', async () => {
    await request(app).post('/api/v1/auth/forgot').send({ email: fixture.usersA.manager.email });
    await catcher.waitFor((m) => m.to.includes(fixture.usersA.manager.email));
    const box = await request(app).get('/api/v1/dev/mailbox').set('Authorization', admin);
    expect(box.status).toBe(200);
    expect(box.body[0]).toMatchObject({
      to: [fixture.usersA.manager.email],
      subject: '[Tierscope] Reset your password',
    });
    expect(box.body[0].receivedAt).toEqual(expect.any(String));
    const asManager = await request(app).get('/api/v1/dev/mailbox').set('Authorization', manager);
    expect(asManager.status).toBe(403);
    expect((await request(app).get('/api/v1/dev/mailbox')).status).toBe(401);
  });

  it('is not there when the catcher is not the configured transport', async () => {
    const plain = createTestApp(database.db);
    const bearer = await bearerFor(plain, fixture.usersA.admin.email);
    const response = await request(plain).get('/api/v1/dev/mailbox').set('Authorization', bearer);
    expect(response.status).toBe(404);
  });
});
