import { createTestDatabase } from '@tierscope/db/testing';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor } from '../../testing/sign-in';
import { createTestApp } from '../../testing/test-app';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
let admin: string;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  app = createTestApp(database.db);
  admin = await bearerFor(app, fixture.usersA.admin.email);
});
afterAll(async () => {
  await database.drop();
});

describe('users', () => {
  it('creates a user who can then sign in with the role given', async () => {
    const created = await request(app)
      .post('/api/v1/users')
      .set('Authorization', admin)
      .send({
        email: 'new.crew@farm-a.test',
        name: 'New Crew',
        password: 'a long password',
        memberships: [{ farmId: fixture.farmA, role: 'crew' }],
      });
    expect(created.status).toBe(201);
    expect(created.body.passwordHash).toBeUndefined();
    const login = await request(app)
      .post('/api/v1/auth/login')
      .send({ email: 'new.crew@farm-a.test', password: 'a long password' });
    expect(login.status).toBe(200);
    expect(login.body.memberships).toEqual([
      { farmId: fixture.farmA, farmName: 'Farm A', role: 'crew' },
    ]);
  });

  it('stores a password hash, never the password', async () => {
    const rows = await database.db.query.users.findMany();
    const user = rows.find((u) => u.email === 'new.crew@farm-a.test');
    expect(user?.passwordHash).toMatch(/^\$argon2id\$/);
    expect(user?.passwordHash).not.toContain('a long password');
  });

  it('refuses a duplicate e-mail, whatever its case', async () => {
    const response = await request(app)
      .post('/api/v1/users')
      .set('Authorization', admin)
      .send({
        email: 'NEW.CREW@farm-a.test',
        name: 'Twin',
        password: 'a long password',
        memberships: [{ farmId: fixture.farmA, role: 'crew' }],
      });
    expect(response.status).toBe(409);
  });

  it('refuses a short password and a missing role with field errors', async () => {
    const response = await request(app)
      .post('/api/v1/users')
      .set('Authorization', admin)
      .send({ email: 'x@farm-a.test', name: 'X', password: 'short', memberships: [] });
    expect(response.status).toBe(400);
    const paths = (response.body.error.fields as { path: string }[]).map((f) => f.path).sort();
    expect(paths).toEqual(['memberships', 'password']);
  });

  it('changes a role and disables a user, who can then no longer sign in', async () => {
    const list = await request(app).get('/api/v1/users').set('Authorization', admin);
    const target = (list.body as { id: number; email: string }[]).find(
      (u) => u.email === 'new.crew@farm-a.test',
    );
    const promoted = await request(app)
      .patch(`/api/v1/users/${target?.id}`)
      .set('Authorization', admin)
      .send({ memberships: [{ farmId: fixture.farmA, role: 'manager' }] });
    expect(promoted.body.memberships).toEqual([{ farmId: fixture.farmA, role: 'manager' }]);
    const disabled = await request(app)
      .patch(`/api/v1/users/${target?.id}`)
      .set('Authorization', admin)
      .send({ disabled: true });
    expect(disabled.body.disabled).toBe(true);
    const login = await request(app)
      .post('/api/v1/auth/login')
      .send({ email: 'new.crew@farm-a.test', password: 'a long password' });
    expect(login.status).toBe(403);
  });

  it('does not let an admin disable themselves', async () => {
    const response = await request(app)
      .patch(`/api/v1/users/${fixture.usersA.admin.id}`)
      .set('Authorization', admin)
      .send({ disabled: true });
    expect(response.status).toBe(400);
  });
});
