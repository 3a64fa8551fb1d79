import { createTestDatabase } from '@tierscope/db/testing';
import { openDatabase } from '@tierscope/db';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from '../../testing/test-app';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
beforeAll(async () => {
  database = await createTestDatabase();
});
afterAll(async () => {
  await database.drop();
});

describe('GET /api/health', () => {
  it('reports the database up', async () => {
    const response = await request(createTestApp(database.db)).get('/api/health');
    expect(response.status).toBe(200);
    expect(response.body).toMatchObject({ status: 'ok', database: 'up' });
  });

  it('reports 503 when the database cannot be reached', async () => {
    // Port 1 on loopback: nothing listens there, so the connection is refused at once.
    const unreachable = openDatabase('postgres://postgres@127.0.0.1:1/none', { max: 1 });
    const response = await request(createTestApp(unreachable.db)).get('/api/health');
    await unreachable.close();
    expect(response.status).toBe(503);
    expect(response.body.database).toBe('down');
  });
});

describe('GET /api/v1/openapi.json', () => {
  it('documents every route with schemas generated from the contracts', async () => {
    const response = await request(createTestApp(database.db)).get('/api/v1/openapi.json');
    expect(response.status).toBe(200);
    expect(response.body.openapi).toBe('3.1.0');
    const create = response.body.paths['/api/v1/farms/{farmId}/houses'].post;
    const bodySchema = create.requestBody.content['application/json'].schema;
    expect(bodySchema.required).toEqual(
      expect.arrayContaining(['name', 'rows', 'tiers', 'timezone', 'lightsOn']),
    );
    expect(bodySchema.properties.tiers.maximum).toBe(4);
    expect(Object.keys(create.responses)).toEqual(
      expect.arrayContaining(['201', '400', '401', '403', '404']),
    );
  });
});
