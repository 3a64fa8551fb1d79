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

const patch = (body: object) =>
  request(app).patch(`/api/v1/farms/${fixture.farmA}`).set('Authorization', admin).send(body);

describe('a farm’s currency', () => {
  it('is USD until an administrator chooses another ISO 4217 code', async () => {
    const before = await request(app)
      .get(`/api/v1/farms/${fixture.farmA}`)
      .set('Authorization', admin);
    expect(before.body.currency).toBe('USD');
    const changed = await patch({ currency: 'eur' });
    expect(changed.status).toBe(200);
    expect(changed.body).toMatchObject({ name: 'Farm A', currency: 'EUR' });
    const listed = await request(app).get('/api/v1/farms').set('Authorization', admin);
    expect(listed.body.find((f: { id: number }) => f.id === fixture.farmA).currency).toBe('EUR');
  });

  it('refuses a code that is not a currency, naming the field', async () => {
    const response = await patch({ currency: 'EURO' });
    expect(response.status).toBe(400);
    expect(response.body.error.fields).toEqual([
      { path: 'currency', message: 'Choose a currency code such as USD, EUR or GBP' },
    ]);
  });

  it('renames a farm without touching its currency, and refuses an empty change', async () => {
    const renamed = await patch({ name: 'Farm A North' });
    expect(renamed.body).toMatchObject({ name: 'Farm A North', currency: 'EUR' });
    expect((await patch({})).status).toBe(400);
  });

  it('is a new farm’s choice when it is added', async () => {
    const created = await request(app)
      .post('/api/v1/farms')
      .set('Authorization', admin)
      .send({ name: 'Farm C', currency: 'CAD' });
    expect(created.status).toBe(201);
    expect(created.body.currency).toBe('CAD');
  });
});
