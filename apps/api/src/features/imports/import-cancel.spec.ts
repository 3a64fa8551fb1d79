import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createTestDatabase } from '@tierscope/db/testing';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Runtime } from '../../app';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor } from '../../testing/sign-in';
import { createTestApp, createTestRuntime } from '../../testing/test-app';
import { ImportRunner } from './import-runner';
import { longMapping } from '../../testing/imports';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
let runtime: Runtime;
let dataDir: string;
const LINES = 40_000;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  dataDir = mkdtempSync(join(tmpdir(), 'tierscope-import-cancel-'));
  runtime = createTestRuntime(database.db, { config: { dataDir } });
  // Small chunks and frequent looks for a cancel request, so the job is caught half-way.
  runtime.imports = new ImportRunner(
    database.db,
    runtime.events,
    join(dataDir, 'imports'),
    () => undefined,
    { chunkRows: 500, reportMs: 10 },
  );
  app = createTestApp(database.db, { runtime, config: { dataDir } });
});
afterAll(async () => {
  await runtime.imports.idle();
  await database.drop();
  rmSync(dataDir, { recursive: true, force: true });
});

describe('cancelling a running import', () => {
  it('stops it at its next look, keeps what was loaded and says so', async () => {
    const lines = ['timestamp,row,tier,eggs'];
    for (let i = 0; i < LINES; i++) {
      const ts = new Date(Date.UTC(2026, 8, 1) + Math.floor(i / 12) * 300_000).toISOString();
      lines.push(`${ts},${(i % 4) + 1},${(Math.floor(i / 4) % 3) + 1},${i % 9}`);
    }
    const integrator = await bearerFor(app, fixture.usersA.integrator.email);
    const started = await request(app)
      .post(`/api/v1/houses/${fixture.houseA}/imports`)
      .set('Authorization', integrator)
      .field('mapping', JSON.stringify(longMapping()))
      .attach('file', Buffer.from(lines.join('\n')), 'big.csv');
    const id = started.body.id as number;
    // Wait until it is running and has read some lines.
    for (let tries = 0; tries < 500; tries++) {
      const status = await request(app)
        .get(`/api/v1/imports/${id}`)
        .set('Authorization', integrator);
      if (status.body.state === 'running' && status.body.linesRead > 0) break;
      await new Promise((resolve) => setTimeout(resolve, 5));
    }
    const cancel = await request(app)
      .post(`/api/v1/imports/${id}/cancel`)
      .set('Authorization', integrator);
    expect(cancel.status).toBe(200);
    await runtime.imports.idle();
    const ended = await request(app).get(`/api/v1/imports/${id}`).set('Authorization', integrator);
    expect(ended.body.state).toBe('cancelled');
    expect(ended.body.message).toBe('Cancelled; readings loaded so far are kept');
    expect(ended.body.linesRead).toBeLessThan(LINES);
  });
});
