import { createTestDatabase } from '@tierscope/db/testing';
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashSync } from '@node-rs/argon2';
import { schema } from '@tierscope/db';
import { updateUser } from '../users/users.repository';
import { FIXTURE_PASSWORD, seedFixture, type Fixture } from '../../testing/fixtures';
import { createTestApp, TEST_JWT_SECRET } from '../../testing/test-app';
import { bearerFor } from '../../testing/sign-in';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  app = createTestApp(database.db);
});
afterAll(async () => {
  await database.drop();
});

describe('POST /api/v1/auth/login', () => {
  it('signs a user in and returns a token, the user and their farm roles', async () => {
    const response = await request(app)
      .post('/api/v1/auth/login')
      .send({ email: fixture.usersA.manager.email, password: FIXTURE_PASSWORD });
    expect(response.status).toBe(200);
    expect(response.body.user.email).toBe(fixture.usersA.manager.email);
    expect(response.body.memberships).toEqual([
      { farmId: fixture.farmA, farmName: 'Farm A', role: 'manager' },
    ]);
    const claims = jwt.verify(response.body.token, TEST_JWT_SECRET) as jwt.JwtPayload;
    expect(claims.sub).toBe(String(fixture.usersA.manager.id));
    // 3600 s is the test app's token lifetime.
    expect((claims.exp ?? 0) - (claims.iat ?? 0)).toBe(3600);
  });

  it('accepts the e-mail in any case', async () => {
    const response = await request(app)
      .post('/api/v1/auth/login')
      .send({ email: fixture.usersA.crew.email.toUpperCase(), password: FIXTURE_PASSWORD });
    expect(response.status).toBe(200);
  });

  it('refuses a wrong password with 401 and the same message as an unknown user', async () => {
    const wrong = await request(app)
      .post('/api/v1/auth/login')
      .send({ email: fixture.usersA.manager.email, password: 'not the password' });
    const unknown = await request(app)
      .post('/api/v1/auth/login')
      .send({ email: 'nobody@nowhere.test', password: 'whatever' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error.code).toBe('invalid_credentials');
    expect(unknown.body.error.message).toBe(wrong.body.error.message);
    expect(wrong.body.token).toBeUndefined();
  });

  it('refuses a disabled user even with the right password', async () => {
    const [user] = await database.db
      .insert(schema.users)
      .values({
        email: 'gone@farm-a.test',
        name: 'Gone',
        passwordHash: hashSync(FIXTURE_PASSWORD),
        disabled: true,
      })
      .returning();
    expect(user).toBeDefined();
    const response = await request(app)
      .post('/api/v1/auth/login')
      .send({ email: 'gone@farm-a.test', password: FIXTURE_PASSWORD });
    expect(response.status).toBe(403);
    expect(response.body.error.code).toBe('account_disabled');
  });

  it('answers a malformed body with 400 and field errors', async () => {
    const response = await request(app).post('/api/v1/auth/login').send({ email: 'not-an-email' });
    expect(response.status).toBe(400);
    const paths = (response.body.error.fields as { path: string }[]).map((f) => f.path).sort();
    expect(paths).toEqual(['email', 'password']);
  });

  it('limits repeated failed sign-ins for one address and e-mail, and counts only failures', async () => {
    const limited = createTestApp(database.db, { loginMaxFailures: 3 });
    const attempt = (password: string) =>
      request(limited)
        .post('/api/v1/auth/login')
        .send({ email: fixture.usersA.admin.email, password });
    expect((await attempt(FIXTURE_PASSWORD)).status).toBe(200);
    for (let i = 0; i < 3; i++) expect((await attempt('wrong password')).status).toBe(401);
    const blocked = await attempt(FIXTURE_PASSWORD);
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('too_many_requests');
    // Another user signing in from the same address is not locked out by someone else's failures.
    const other = await request(limited)
      .post('/api/v1/auth/login')
      .send({ email: fixture.usersA.crew.email, password: FIXTURE_PASSWORD });
    expect(other.status).toBe(200);
  });
});

describe('bearer tokens', () => {
  it('lets a valid token read the session', async () => {
    const response = await request(app)
      .get('/api/v1/auth/me')
      .set('Authorization', await bearerFor(app, fixture.usersA.integrator.email));
    expect(response.status).toBe(200);
    expect(response.body.memberships[0].role).toBe('integrator');
  });

  it('refuses a request with no token', async () => {
    const response = await request(app).get('/api/v1/farms');
    expect(response.status).toBe(401);
    expect(response.body.error.code).toBe('unauthenticated');
  });

  it('refuses an expired token', async () => {
    const expired = jwt.sign({}, TEST_JWT_SECRET, {
      subject: String(fixture.usersA.admin.id),
      issuer: 'tierscope',
      audience: 'tierscope-user',
      expiresIn: -10,
    });
    const response = await request(app)
      .get('/api/v1/farms')
      .set('Authorization', `Bearer ${expired}`);
    expect(response.status).toBe(401);
  });

  it('refuses a tampered token', async () => {
    const token = (await bearerFor(app, fixture.usersA.crew.email)).slice('Bearer '.length);
    const [header, payload, signature] = token.split('.') as [string, string, string];
    const claims = JSON.parse(Buffer.from(payload, 'base64url').toString()) as Record<
      string,
      unknown
    >;
    const forged = Buffer.from(
      JSON.stringify({ ...claims, sub: String(fixture.usersA.admin.id) }),
    ).toString('base64url');
    const response = await request(app)
      .get('/api/v1/auth/me')
      .set('Authorization', `Bearer ${header}.${forged}.${signature}`);
    expect(response.status).toBe(401);
  });

  it('refuses a token signed with another secret', async () => {
    const foreign = jwt.sign({}, 'another-secret-another-secret-another-secret', {
      subject: String(fixture.usersA.admin.id),
      issuer: 'tierscope',
      audience: 'tierscope-user',
    });
    const response = await request(app)
      .get('/api/v1/farms')
      .set('Authorization', `Bearer ${foreign}`);
    expect(response.status).toBe(401);
  });

  it('stops honouring the token of a user who is disabled after signing in', async () => {
    const [user] = await database.db
      .insert(schema.users)
      .values({
        email: 'soon-gone@farm-a.test',
        name: 'Soon gone',
        passwordHash: hashSync(FIXTURE_PASSWORD),
      })
      .returning();
    const bearer = await bearerFor(app, 'soon-gone@farm-a.test');
    expect((await request(app).get('/api/v1/auth/me').set('Authorization', bearer)).status).toBe(
      200,
    );
    await updateUser(database.db, user?.id ?? 0, { disabled: true });
    expect((await request(app).get('/api/v1/auth/me').set('Authorization', bearer)).status).toBe(
      401,
    );
  });
});
