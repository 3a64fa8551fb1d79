import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync, chmodSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { hash } from '@node-rs/argon2';
import { insertHouseWithLayout, openDatabase, runMigrations, schema } from '@tierscope/db';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startCluster, type Cluster } from '../../scripts/postgres';
import {
  freePort,
  makeGatewayKey,
  signInThroughApi,
  startApiProcess,
  type ApiProcess,
} from '../../scripts/processes';

/**
 * The simulator against the real API on a PostgreSQL of its own, which is stopped and started again in the
 * middle of the run: afterwards every egg the simulator sent is in the database exactly once.
 */
const ROOT = new URL('../..', import.meta.url).pathname;
let dir: string;
let cluster: Cluster;
let api: ApiProcess;
let apiUrl: string;
let databaseUrl: string;

async function waitFor(
  check: () => Promise<boolean>,
  timeoutMs: number,
  what: string,
): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await check().catch(() => false))) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'tierscope-outage-'));
  chmodSync(dir, 0o755);
  const pgPort = await freePort();
  cluster = startCluster({ dir: join(dir, 'pg'), port: pgPort, databases: ['outage'] });
  databaseUrl = cluster.url('outage');
  const setup = openDatabase(databaseUrl, { max: 1 });
  await runMigrations(setup.db);
  const [farm] = await setup.db.insert(schema.farms).values({ name: 'Outage Farm' }).returning();
  await insertHouseWithLayout(setup.db, farm!.id, {
    name: 'House 1',
    rows: 8,
    tiers: 3,
    timezone: 'America/Chicago',
    lightsOn: '04:00',
    photoperiodHours: 16,
    shortfallThresholdPct: 10,
  });
  const [user] = await setup.db
    .insert(schema.users)
    .values({
      email: 'int@outage.test',
      name: 'Integrator',
      passwordHash: await hash('outage-password'),
    })
    .returning();
  await setup.db
    .insert(schema.memberships)
    .values({ userId: user!.id, farmId: farm!.id, role: 'integrator' });
  await setup.close();

  api = await startApiProcess({
    DATABASE_URL: databaseUrl,
    JWT_SECRET: 'outage-secret-outage-secret-outage-secret',
  });
  apiUrl = api.baseUrl;
});

afterAll(async () => {
  await api.stop();
  cluster.stop();
  rmSync(dir, { recursive: true, force: true });
});

describe('the simulator through a database outage', () => {
  it('loses nothing and counts nothing twice', async () => {
    const login = await signInThroughApi(apiUrl, 'int@outage.test', 'outage-password');
    const auth = { authorization: `Bearer ${login.token}`, 'content-type': 'application/json' };
    const farmId = login.memberships[0]!.farmId;
    const gateway = { key: await makeGatewayKey(apiUrl, login.token, farmId, 'Simulator') };
    const houses = (await (
      await fetch(`${apiUrl}/api/v1/farms/${farmId}/houses`, { headers: auth })
    ).json()) as { id: number }[];
    const house = (await (
      await fetch(`${apiUrl}/api/v1/houses/${houses[0]!.id}`, { headers: auth })
    ).json()) as Record<string, unknown> & { counters: unknown[] };
    const farmFile = join(dir, 'farm.json');
    writeFileSync(
      farmFile,
      JSON.stringify({
        farm: 'Outage Farm',
        apiUrl,
        gatewayKey: gateway.key,
        houses: [{ ...house, hensHoused: 40000, flockAgeWeeks: 30 }],
      }),
    );
    const summaryFile = join(dir, 'summary.json');

    const simulator = spawn(
      process.execPath,
      [
        '--import',
        'tsx',
        'simulator/src/main.ts',
        '--farm-file',
        farmFile,
        '--seed',
        '7',
        '--backfill-days',
        '12',
        '--backfill-interval',
        '5',
        '--duration',
        '0',
        '--summary',
        summaryFile,
        '--start',
        '2026-11-20T12:00:00Z',
      ],
      {
        cwd: ROOT,
        stdio: ['ignore', 'pipe', 'inherit'],
      },
    );
    let output = '';
    simulator.stdout.on('data', (chunk: Buffer) => (output += chunk.toString()));
    const exited = new Promise<number>((resolve) =>
      simulator.once('exit', (code) => {
        resolve(code ?? 1);
      }),
    );

    // As soon as the first batch has landed, take the database away for a few seconds.
    const watch = openDatabase(databaseUrl, { max: 1 });
    await waitFor(
      async () =>
        Number(
          (await watch.db.execute<{ n: number }>(sql`select count(*)::int as n from readings`))
            .rows[0]?.n,
        ) > 0,
      60_000,
      'the first readings',
    );
    await watch.close();
    cluster.stop();
    await new Promise((r) => setTimeout(r, 3000));
    startCluster({ dir: join(dir, 'pg'), port: cluster.port, databases: [] });

    expect(await exited).toBe(0);
    // The simulator noticed and kept its backlog while waiting.
    expect(output).toMatch(/waiting, retrying/);
    const summary = JSON.parse(readFileSync(summaryFile, 'utf8')) as {
      farms: { eggs: number; readings: number; retries: number }[];
    };
    const sent = summary.farms[0]!;
    expect(sent.retries).toBeGreaterThan(0);

    const check = openDatabase(databaseUrl, { max: 1 });
    try {
      const stored = (
        await check.db.execute<{ readings: number; eggs: number }>(
          sql`select count(*)::int as readings, coalesce(sum(eggs), 0)::int as eggs from readings`,
        )
      ).rows[0]!;
      expect(stored.readings).toBe(sent.readings);
      expect(stored.eggs).toBe(sent.eggs);
      const rolled = (
        await check.db.execute<{ eggs: number }>(
          sql`select coalesce(sum(eggs), 0)::int as eggs from counter_hour_rollups`,
        )
      ).rows[0]!;
      expect(rolled.eggs).toBe(sent.eggs);
    } finally {
      await check.close();
    }
  }, 180_000);
});
