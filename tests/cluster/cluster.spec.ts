import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { hash } from '@node-rs/argon2';
import { insertHouseWithLayout, schema } from '@tierscope/db';
import { defaultBeltCounterId } from '@tierscope/domain';
import { createTestDatabase } from '@tierscope/db/testing';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import WebSocket from 'ws';
import {
  makeGatewayKey,
  signInThroughApi,
  startApiProcess,
  type ApiProcess,
} from '../../scripts/processes';
import { startBalancer } from '../../scripts/balancer';
import { solidPng } from '../fixtures/images';
import { withLease } from '../../apps/api/src/platform/leases';
import { importForm } from '../../apps/api/src/testing/imports';

/**
 * Three real API processes on one PostgreSQL, as behind a load balancer: what one process learns, the
 * others' browsers hear; limits hold across them; a process stopped with SIGTERM hands its browsers over.
 */
const PASSWORD = 'cluster-pass';
const MAX_FAILURES = 4;
let database: Awaited<ReturnType<typeof createTestDatabase>>;
let dir: string;
let processes: ApiProcess[] = [];
let houseId: number;
let farmId: number;
let env: Record<string, string>;

beforeAll(async () => {
  database = await createTestDatabase();
  dir = mkdtempSync(join(tmpdir(), 'tierscope-cluster-'));
  const [farm] = await database.db
    .insert(schema.farms)
    .values({ name: 'Cluster Farm' })
    .returning();
  farmId = farm!.id;
  const house = await insertHouseWithLayout(database.db, farmId, {
    name: 'House 1',
    rows: 2,
    tiers: 2,
    timezone: 'UTC',
    lightsOn: '00:00',
    photoperiodHours: 16,
    shortfallThresholdPct: 10,
  });
  houseId = house.id;
  const [user] = await database.db
    .insert(schema.users)
    .values({ email: 'admin@cluster.test', name: 'Admin', passwordHash: await hash(PASSWORD) })
    .returning();
  await database.db.insert(schema.memberships).values({ userId: user!.id, farmId, role: 'admin' });
  env = {
    DATABASE_URL: database.url,
    JWT_SECRET: randomBytes(32).toString('hex'),
    LOGIN_MAX_FAILURES: String(MAX_FAILURES),
    SHUTDOWN_DRAIN_MS: '1500',
  };
  processes = await Promise.all(
    [0, 1, 2].map((i) => startApiProcess(envOf(i), { stdio: ['ignore', 'ignore', 'ignore'] })),
  );
}, 120_000);

afterAll(async () => {
  await Promise.all(processes.map((p) => p.stop()));
  await database.drop();
  rmSync(dir, { recursive: true, force: true });
});

/** Each process its own data folder, as on separate machines: nothing may rely on another's disk. */
const envOf = (i: number) => ({ ...env, DATA_DIR: join(dir, `data-${i}`) });

type Message = { type: string; houseId?: number; [k: string]: unknown };

/** A signed-in socket on one process, watching the house; keeps every message it gets. */
async function watcher(api: ApiProcess, token: string) {
  const socket = new WebSocket(`${api.baseUrl.replace('http', 'ws')}/api/v1/live`);
  const messages: Message[] = [];
  const closed = new Promise<number>((resolve) =>
    socket.on('close', (code) => {
      resolve(code);
    }),
  );
  socket.on('error', () => undefined);
  socket.on('message', (data: Buffer) =>
    messages.push(JSON.parse(data.toString('utf8')) as Message),
  );
  await new Promise<void>((resolve, reject) => {
    socket.once('open', () => {
      resolve();
    });
    socket.once('error', reject);
  });
  socket.send(JSON.stringify({ type: 'auth', token }));
  await until(() => messages.some((m) => m.type === 'ready'));
  socket.send(JSON.stringify({ type: 'subscribe', houseId }));
  await until(() => messages.some((m) => m.type === 'snapshot'));
  return { socket, messages, closed };
}

async function until(isDone: () => boolean | Promise<boolean>, timeoutMs = 20_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await isDone())) {
    if (Date.now() > deadline) throw new Error('timed out waiting');
    await new Promise((resolve) => setTimeout(resolve, 25));
  }
}

async function post(api: ApiProcess, key: string, readings: object[]): Promise<number> {
  const response = await fetch(`${api.baseUrl}/api/v1/ingest/readings`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
    body: JSON.stringify({ readings }),
  });
  return response.status;
}

/**
 * A gateway posting two readings (rows 1 and 2 of one tier) each `pauseMs`, one second of readings apart
 * from `base`, each batch sent again until it is taken, as the simulator does. `stop()` says how many
 * readings were taken and how many sends were refused.
 */
function startGateway(
  url: string,
  key: string,
  options: { tier: number; eggs: number; base: number; pauseMs: number },
) {
  const state = { isOn: true };
  let sent = 0;
  let refusals = 0;
  const running = (async () => {
    for (let batch = 0; state.isOn; batch++) {
      const readings = [1, 2].map((row) => ({
        counter: defaultBeltCounterId(houseId, { row, tier: options.tier }),
        ts: new Date(options.base + batch * 1000).toISOString(),
        eggs: options.eggs,
      }));
      while ((await post({ baseUrl: url } as ApiProcess, key, readings).catch(() => 0)) !== 200) {
        refusals += 1;
        await new Promise((resolve) => setTimeout(resolve, 100));
      }
      sent += readings.length;
      await new Promise((resolve) => setTimeout(resolve, options.pauseMs));
    }
  })();
  return {
    async stop() {
      state.isOn = false;
      await running;
      return { sent, refusals };
    },
  };
}

/** The three processes behind a balancer, the admin signed in through it and a gateway key made. */
async function behindBalancer(gatewayName: string) {
  const ports = processes.map((p) => Number(new URL(p.baseUrl).port));
  const balancer = await startBalancer({ port: 0, targets: processes.map((p) => p.baseUrl) });
  const url = `http://127.0.0.1:${balancer.port}`;
  const { token } = await signInThroughApi(url, 'admin@cluster.test', PASSWORD);
  const key = await makeGatewayKey(url, token, farmId, gatewayName);
  return { balancer, url, ports, token, key };
}

describe('three API processes on one database', () => {
  it('sends every browser the frames for readings another process stored', async () => {
    const [a, b, c] = processes as [ApiProcess, ApiProcess, ApiProcess];
    const { token } = await signInThroughApi(a.baseUrl, 'admin@cluster.test', PASSWORD);
    const key = await makeGatewayKey(b.baseUrl, token, farmId, 'cluster gateway');
    const sockets = await Promise.all([a, b, c].map((p) => watcher(p, token)));
    const framesBefore = sockets.map((s) => s.messages.filter((m) => m.type === 'frame').length);
    const now = Date.now();
    const readings = [1, 2].flatMap((row) =>
      [1, 2].map((tier) => ({
        counter: defaultBeltCounterId(houseId, { row, tier }),
        ts: new Date(now - 60_000).toISOString(),
        eggs: 40 + row + tier,
      })),
    );
    expect(await post(b, key, readings)).toBe(200);
    // Each process's socket gets a frame: B's from its own event, A's and C's through PostgreSQL.
    for (const [i, s] of sockets.entries()) {
      await until(() => s.messages.filter((m) => m.type === 'frame').length > framesBefore[i]!);
    }
    const frame = sockets[2]!.messages.findLast((m) => m.type === 'frame');
    expect(frame?.houseId).toBe(houseId);
    // Sent again through another process: stored once.
    expect(await post(c, key, readings)).toBe(200);
    const stored = await database.db.execute<{ n: number; eggs: number }>(sql`
      SELECT count(*)::int AS n, sum(r.eggs)::int AS eggs
      FROM readings r JOIN counters k ON k.id = r.counter_id WHERE k.house_id = ${houseId}`);
    expect(stored.rows[0]).toEqual({ n: 4, eggs: 4 * 40 + 12 });
    for (const s of sockets) s.socket.close();
  });

  it('counts failed sign-ins across every process', async () => {
    const attempt = async (api: ApiProcess, password: string) =>
      (
        await fetch(`${api.baseUrl}/api/v1/auth/login`, {
          method: 'POST',
          headers: { 'content-type': 'application/json' },
          body: JSON.stringify({ email: 'someone@cluster.test', password }),
        })
      ).status;
    // The limit's failures spread over the three processes: with one memory store each, each would
    // allow MAX_FAILURES of its own.
    const statuses: number[] = [];
    for (let i = 0; i < MAX_FAILURES; i++)
      statuses.push(await attempt(processes[i % 3]!, 'wrong-password'));
    expect(statuses).toEqual(Array.from({ length: MAX_FAILURES }, () => 401));
    for (const api of processes) expect(await attempt(api, 'wrong-password')).toBe(429);
  });

  it('runs work under one lease in one holder at a time, and gives it up to waiters after', async () => {
    // Three holders (as three processes) want the same house at once: they take turns, never overlap.
    const log: { holder: string; at: 'start' | 'end' }[] = [];
    const outcomes = await Promise.all(
      ['p1', 'p2', 'p3'].map((holder) =>
        withLease(
          database.db,
          'house:lease-test',
          holder,
          async () => {
            log.push({ holder, at: 'start' });
            await new Promise((resolve) => setTimeout(resolve, 150));
            log.push({ holder, at: 'end' });
          },
          { waitMs: 10_000 },
        ),
      ),
    );
    expect(outcomes.every((o) => o.ran)).toBe(true);
    for (let i = 0; i < log.length; i += 2) {
      expect(log[i]?.at).toBe('start');
      expect(log[i + 1]).toEqual({ holder: log[i]?.holder, at: 'end' });
    }
    // One that will not wait is turned away while another holds it.
    const slow = withLease(
      database.db,
      'house:lease-test',
      'p1',
      () => new Promise((resolve) => setTimeout(resolve, 300)),
    );
    await new Promise((resolve) => setTimeout(resolve, 50));
    expect((await withLease(database.db, 'house:lease-test', 'p2', async () => 1)).ran).toBe(false);
    await slow;
  });

  it('serves a photo uploaded through one process from another', async () => {
    const [a, b] = processes as [ApiProcess, ApiProcess];
    const { token } = await signInThroughApi(a.baseUrl, 'admin@cluster.test', PASSWORD);
    const headers = { authorization: `Bearer ${token}` };
    const created = await fetch(`${a.baseUrl}/api/v1/work-orders`, {
      method: 'POST',
      headers: { ...headers, 'content-type': 'application/json' },
      body: JSON.stringify({ houseId, row: 1, tier: 1, title: 'Check the drinkers' }),
    });
    expect(created.status).toBe(201);
    const order = (await created.json()) as { id: number };
    const form = new FormData();
    form.append(
      'photos',
      new Blob([new Uint8Array(solidPng(4, 3, [10, 200, 30]))], { type: 'image/png' }),
      'a.png',
    );
    const uploaded = await fetch(`${a.baseUrl}/api/v1/work-orders/${order.id}/photos`, {
      method: 'POST',
      headers,
      body: form,
    });
    expect(uploaded.status).toBe(201);
    const { photos } = (await uploaded.json()) as { photos: { id: number; bytes: number }[] };
    const served = await fetch(
      `${b.baseUrl}/api/v1/work-orders/${order.id}/photos/${photos[0]!.id}`,
      {
        headers,
      },
    );
    expect(served.status).toBe(200);
    expect(served.headers.get('content-type')).toBe('image/png');
    expect((await served.arrayBuffer()).byteLength).toBe(photos[0]!.bytes);
  });

  it('goes through a rolling restart behind the balancer losing no reading, and browsers reconnect', async () => {
    const { balancer, url, ports, token, key } = await behindBalancer('rolling gateway');
    try {
      // A browser: on a close it connects again after a moment (as the web app does) and watches again.
      let socketsOpened = 0;
      let snapshotsSinceLastOpen = 0;
      let current: WebSocket | null = null;
      let isDone = false;
      const connect = () => {
        const socket = new WebSocket(`${url.replace('http', 'ws')}/api/v1/live`);
        current = socket;
        socket.on('error', () => undefined);
        socket.on('open', () => {
          socketsOpened += 1;
          snapshotsSinceLastOpen = 0;
          socket.send(JSON.stringify({ type: 'auth', token }));
          socket.send(JSON.stringify({ type: 'subscribe', houseId }));
        });
        socket.on('message', (data: Buffer) => {
          const m = JSON.parse(data.toString('utf8')) as Message;
          if (m.type === 'snapshot') snapshotsSinceLastOpen += 1;
        });
        socket.on('close', () => {
          if (!isDone) setTimeout(connect, 200);
        });
      };
      connect();
      // A gateway: a batch every 50 ms, each sent again until it is taken (as the simulator does).
      const base = Date.now() - 3_600_000;
      const gateway = startGateway(url, key, { tier: 1, eggs: 1, base, pauseMs: 50 });
      for (let i = 0; i < processes.length; i++) {
        await new Promise((resolve) => setTimeout(resolve, 1000));
        await processes[i]!.stop();
        processes[i] = await startApiProcess(envOf(i), {
          stdio: ['ignore', 'ignore', 'ignore'],
          port: ports[i]!,
        });
      }
      await until(() => balancer.ready().length === 3);
      await new Promise((resolve) => setTimeout(resolve, 1000));
      const { sent, refusals } = await gateway.stop();
      await until(() => snapshotsSinceLastOpen > 0 && current?.readyState === WebSocket.OPEN);
      isDone = true;
      (current as WebSocket | null)?.close();
      const stored = await database.db.execute<{ n: number }>(sql`
        SELECT count(*)::int AS n FROM readings r JOIN counters k ON k.id = r.counter_id
        WHERE k.house_id = ${houseId} AND r.ts >= ${new Date(base)}
          AND r.ts < ${new Date(base + 3_000_000)}`); // not the first test's readings (a minute ago)
      // Every reading the gateway was told was taken is stored, once; retries never counted twice.
      expect(stored.rows[0]?.n).toBe(sent);
      expect(sent).toBeGreaterThan(40);
      // The browser was moved at least once and is connected again at the end.
      expect(socketsOpened).toBeGreaterThan(1);
      console.log(
        `rolling restart: ${sent} readings taken, ${refusals} batches sent again, ${socketsOpened} socket connections`,
      );
    } finally {
      await balancer.close();
    }
  }, 120_000);

  it('loses no reading and counts none twice when a process is killed (SIGKILL) during ingest', async () => {
    const { balancer, url, ports, key } = await behindBalancer('killed gateway');
    try {
      const base = Date.now() - 2 * 3_600_000;
      // Sent again until taken: a batch whose answer was lost with its process may already be stored.
      const gateway = startGateway(url, key, { tier: 2, eggs: 2, base, pauseMs: 20 });
      await new Promise((resolve) => setTimeout(resolve, 1500));
      const victim = processes[1]!;
      process.kill(-victim.child.pid!, 'SIGKILL');
      await new Promise((resolve) => victim.child.once('exit', resolve));
      await new Promise((resolve) => setTimeout(resolve, 1500));
      processes[1] = await startApiProcess(envOf(1), {
        stdio: ['ignore', 'ignore', 'ignore'],
        port: ports[1]!,
      });
      await until(() => balancer.ready().length === 3);
      const { sent, refusals } = await gateway.stop();
      const stored = await database.db.execute<{ n: number; eggs: number }>(sql`
        SELECT count(*)::int AS n, sum(r.eggs)::int AS eggs FROM readings r
        JOIN counters k ON k.id = r.counter_id
        WHERE k.house_id = ${houseId} AND r.ts >= ${new Date(base)} AND r.ts < ${new Date(base + 3_000_000)}`);
      expect(stored.rows[0]).toEqual({ n: sent, eggs: 2 * sent });
      // Rollups agree with the readings (nothing half-written by the killed process).
      const rolled = await database.db.execute<{ eggs: number; rolled: number }>(sql`
        SELECT (SELECT sum(r.eggs)::int FROM readings r JOIN counters k ON k.id = r.counter_id
                WHERE k.house_id = ${houseId} AND k.kind = 'belt') AS eggs,
               (SELECT sum(d.eggs)::int FROM section_day_rollups d JOIN sections x ON x.id = d.section_id
                WHERE x.house_id = ${houseId}) AS rolled`);
      expect(rolled.rows[0]?.eggs).toBe(
        (rolled.rows[0] as { rolled?: number } | undefined)?.rolled,
      );
      expect(sent).toBeGreaterThan(40);
      console.log(`SIGKILL during ingest: ${sent} readings taken, ${refusals} batches sent again`);
    } finally {
      await balancer.close();
    }
  }, 120_000);

  it('finishes an import on another process when the one running it is killed (SIGKILL)', async () => {
    const [a] = processes as [ApiProcess];
    const { token } = await signInThroughApi(a.baseUrl, 'admin@cluster.test', PASSWORD);
    const lines = ['timestamp,row,tier,eggs'];
    const IMPORT_LINES = 80_000;
    const start = Date.UTC(2026, 5, 1);
    for (let i = 0; i < IMPORT_LINES; i++) {
      const section = i % 4;
      const ts = new Date(start + Math.floor(i / 4) * 300_000).toISOString();
      lines.push(`${ts},${Math.floor(section / 2) + 1},${(section % 2) + 1},${i % 13}`);
    }
    const form = importForm(lines.join('\n') + '\n');
    const started = await fetch(`${a.baseUrl}/api/v1/houses/${houseId}/imports`, {
      method: 'POST',
      headers: { authorization: `Bearer ${token}` },
      body: form,
    });
    expect(started.status).toBe(202);
    const { id } = (await started.json()) as { id: number };
    const importedSoFar = async () =>
      (
        await database.db.execute<{ n: number }>(sql`
          SELECT count(*)::int AS n FROM readings r JOIN counters k ON k.id = r.counter_id
          WHERE k.house_id = ${houseId} AND r.ts >= ${new Date(start)} AND r.ts < ${new Date(start + 80 * 86_400_000)}`)
      ).rows[0]!.n;
    await until(async () => (await importedSoFar()) > 0, 60_000);
    process.kill(-a.child.pid!, 'SIGKILL');
    await new Promise((resolve) => a.child.once('exit', resolve));
    // A running import whose process died: another one takes it over (its own data folder holds no file).
    const b = processes[1]!;
    let status: { state: string; readingsAdded: number; duplicates: number; linesRead: number };
    const deadline = Date.now() + 170_000;
    for (;;) {
      const response = await fetch(`${b.baseUrl}/api/v1/imports/${id}`, {
        headers: { authorization: `Bearer ${token}` },
      });
      status = (await response.json()) as typeof status;
      if (status.state === 'done' || status.state === 'failed') break;
      if (Date.now() > deadline) throw new Error(`the import did not end (${status.state})`);
      await new Promise((resolve) => setTimeout(resolve, 250));
    }
    expect(status.state).toBe('done');
    expect(status.linesRead).toBe(IMPORT_LINES);
    expect(await importedSoFar()).toBe(IMPORT_LINES);
    processes[0] = await startApiProcess(envOf(0), { stdio: ['ignore', 'ignore', 'ignore'] });
  }, 200_000);

  it('on SIGTERM stops taking work and tells its browsers to reconnect; the others go on', async () => {
    const [a, b] = processes as [ApiProcess, ApiProcess];
    const { token } = await signInThroughApi(b.baseUrl, 'admin@cluster.test', PASSWORD);
    const onA = await watcher(a, token);
    const onB = await watcher(b, token);
    const live = (await (await fetch(`${a.baseUrl}/api/health/live`)).json()) as {
      process: string;
    };
    await a.stop();
    // 1012: "service restart" — the browser connects again, to a process still running.
    expect(await onA.closed).toBe(1012);
    expect(a.child.exitCode).toBe(0);
    const ready = await fetch(`${b.baseUrl}/api/health/ready`);
    expect(ready.status).toBe(200);
    const again = await watcher(b, token);
    expect(again.messages.some((m) => m.type === 'snapshot')).toBe(true);
    onB.socket.close();
    again.socket.close();
    // The stopped process gave back every lease it held.
    const left = await database.db.execute(
      sql`SELECT name FROM leases WHERE holder = ${live.process} AND until > now()`,
    );
    expect(live.process).toMatch(/^[0-9a-f-]{36}$/);
    expect(left.rows).toEqual([]);
  });
});
