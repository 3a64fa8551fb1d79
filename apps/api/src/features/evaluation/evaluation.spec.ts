// Longer than ~350 lines on purpose: one database and one API share the engine's live cases (each a planted
// fault and what it must and must not raise); splitting them would set the house up again per file.
import { createServer, type Server } from 'node:http';
import { createTestDatabase } from '@tierscope/db/testing';
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import type { Runtime } from '../../app';
import { attachLive } from '../../realtime/live';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor, gatewayKeyFor, postReadings } from '../../testing/sign-in';
import { createTestApp, createTestRuntime } from '../../testing/test-app';
import { countersOfHouse } from '../houses/houses.repository';

/**
 * The shortfall engine end to end on the real database: readings in through the ingest API, evaluations,
 * exceptions through their lifecycle, the map, and the live socket.
 * House A1 (4 rows × 3 tiers, America/Chicago, lights on 04:00 = 10:00 UTC in November).
 */
let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let runtime: Runtime;
let app: ReturnType<typeof createTestApp>;
let key: string;
let counters: Awaited<ReturnType<typeof countersOfHouse>>;

const DAY0 = Date.UTC(2026, 10, 12, 10); // lights-on of the first history day
const HOUR = 3_600_000;
/** "Now" for these tests: 2026-11-20 20:00 UTC, ten hours into the ninth production day. */
const NOW = new Date(DAY0 + 8 * 24 * HOUR + 10 * HOUR);

/** Eggs per section per hour of light: tiers differ by design, row 4 is an end row (8 % lower). */
function eggsFor(row: number, tier: number): number {
  return Math.round([90, 120, 105][tier - 1]! * (row === 4 ? 0.92 : 1));
}

function ingest(readings: { counter: string; ts: string; eggs: number }[]) {
  return postReadings(app, key, readings);
}

/** Hourly readings for every belt and the collector over [fromHour, toHour) after DAY0, skipping the dark. */
function hours(
  fromHour: number,
  toHour: number,
  adjust: (row: number, tier: number, hour: number) => number = () => 1,
) {
  const readings: { counter: string; ts: string; eggs: number }[] = [];
  for (let h = fromHour; h < toHour; h++) {
    if (h % 24 >= 16) continue; // 16 h of light
    const ts = new Date(DAY0 + (h + 1) * HOUR).toISOString();
    let total = 0;
    for (const c of counters.filter((x) => x.kind === 'belt')) {
      const eggs = Math.round(eggsFor(c.row!, c.tier!) * adjust(c.row!, c.tier!, h));
      total += eggs;
      readings.push({ counter: c.externalId, ts, eggs });
    }
    readings.push({
      counter: counters.find((x) => x.kind === 'collector')!.externalId,
      ts,
      eggs: total,
    });
  }
  return readings;
}

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  runtime = createTestRuntime(database.db);
  app = createTestApp(database.db, { runtime });
  key = await gatewayKeyFor(app, await bearerFor(app, fixture.usersA.admin.email), fixture.farmA);
  counters = await countersOfHouse(database.db, fixture.houseA);
  // Eight clean days, then today with section row 2 tier 2 laying 20 % less.
  await ingest(hours(0, 8 * 24));
  await ingest(hours(8 * 24, 8 * 24 + 10, (r, t) => (r === 2 && t === 2 ? 0.8 : 1)));
});
afterAll(async () => {
  await database.drop();
});

describe('evaluating a house', () => {
  it('judges the short section at the first checkpoint once, not on every evaluation in between', async () => {
    // Four hours after lights-on no checkpoint has passed yet: nothing is judged, whatever the running total.
    const early = await runtime.evaluation.evaluateNow(
      fixture.houseA,
      new Date(NOW.getTime() - 6 * HOUR),
    );
    expect(early.changed).toEqual([]);
    // Nine hours after lights-on the 5-hour checkpoint has passed: judged once, and the section opens.
    const first = await runtime.evaluation.evaluateNow(
      fixture.houseA,
      new Date(NOW.getTime() - HOUR),
    );
    expect(first.changed.map((e) => [e.kind, e.scope, e.row, e.tier])).toEqual([
      ['shortfall', 'section', 2, 2],
    ]);
    // Again a minute later: no checkpoint is due, so nothing is judged again.
    const again = await runtime.evaluation.evaluateNow(
      fixture.houseA,
      new Date(NOW.getTime() - HOUR + 60_000),
    );
    expect(again.changed).toEqual([]);
    const second = await runtime.evaluation.evaluateNow(fixture.houseA, NOW);
    const opened = second.changed[0] ?? first.changed[0]!;
    expect(opened.ratio).toBeCloseTo(0.8, 1);
    expect(opened.pValue).toBeLessThan(0.01);
    expect(opened.isLearning).toBe(false);
    expect(opened.eggsLost).toBeGreaterThan(200);
  });

  it('evaluating again does not open a second exception for the same spot', async () => {
    await runtime.evaluation.evaluateNow(fixture.houseA, new Date(NOW.getTime() + 60_000));
    const rows = await database.db.execute<{ n: number }>(
      sql`select count(*)::int as n from exceptions where house_id = ${fixture.houseA}`,
    );
    expect(rows.rows[0]?.n).toBe(1);
  });
});

describe('GET /api/v1/houses/:houseId/map', () => {
  it('shows every section with eggs, expected and ratio, and marks the flagged one', async () => {
    const manager = await bearerFor(app, fixture.usersA.manager.email);
    const map = (day: string) =>
      request(app)
        .get(`/api/v1/houses/${fixture.houseA}/map?window=custom&from=${day}&to=${day}`)
        .set('Authorization', manager);
    const clean = await map('2026-11-19');
    expect(clean.status).toBe(200);
    expect(clean.body.cells).toHaveLength(12);
    // A clean day: every ratio ≈ 1, the end row included (its baseline knows it is 8 % lower).
    for (const cell of clean.body.cells) expect(cell.ratio).toBeCloseTo(1, 1);
    expect(clean.body.window.isComplete).toBe(true);
    const faulty = await map('2026-11-20');
    const flagged = faulty.body.cells.filter(
      (c: { exceptionId: number | null }) => c.exceptionId !== null,
    );
    expect(flagged.map((c: { row: number; tier: number }) => [c.row, c.tier])).toEqual([[2, 2]]);
    expect(flagged[0].ratio).toBeCloseTo(0.8, 1);
    expect(flagged[0].exceptionKind).toBe('shortfall');
  });

  it('answers 400 for a custom window without dates and 404 for a house of another farm', async () => {
    const manager = await bearerFor(app, fixture.usersA.manager.email);
    expect(
      (
        await request(app)
          .get(`/api/v1/houses/${fixture.houseA}/map?window=custom`)
          .set('Authorization', manager)
      ).status,
    ).toBe(400);
    expect(
      (await request(app).get(`/api/v1/houses/${fixture.houseB}/map`).set('Authorization', manager))
        .status,
    ).toBe(404);
    expect((await request(app).get(`/api/v1/houses/${fixture.houseA}/map`)).status).toBe(401);
  });
});

describe('GET /api/v1/houses/:houseId/cells/:row/:tier', () => {
  it("gives a section's last 14 days against expected and its open exception", async () => {
    const manager = await bearerFor(app, fixture.usersA.manager.email);
    const response = await request(app)
      .get(`/api/v1/houses/${fixture.houseA}/cells/2/2`)
      .set('Authorization', manager);
    expect(response.status).toBe(200);
    expect(response.body.days).toHaveLength(14);
    const nineteenth = response.body.days.find((d: { day: string }) => d.day === '2026-11-19');
    expect(nineteenth.eggs).toBe(120 * 16);
    expect(nineteenth.expected).toBeCloseTo(120 * 16, -1);
    expect(response.body.exception).toMatchObject({ scope: 'section', row: 2, tier: 2 });
    expect(
      (
        await request(app)
          .get(`/api/v1/houses/${fixture.houseA}/cells/9/9`)
          .set('Authorization', manager)
      ).status,
    ).toBe(404);
  });
});

describe('the exception lifecycle', () => {
  it('lists the exception with its figures and likely checks', async () => {
    const crew = await bearerFor(app, fixture.usersA.crew.email);
    const response = await request(app)
      .get(`/api/v1/exceptions?houseId=${fixture.houseA}&status=live`)
      .set('Authorization', crew);
    expect(response.status).toBe(200);
    expect(response.body).toHaveLength(1);
    expect(response.body[0]).toMatchObject({
      kind: 'shortfall',
      scope: 'section',
      row: 2,
      tier: 2,
      status: 'open',
      houseName: 'A1',
    });
    expect(response.body[0].likelyChecks.join(' ')).toMatch(/Drinkers/);
    expect(response.body[0].eggsLostValue).toBeNull();
    // With a price per dozen set on the house, eggs lost get their money value.
    const admin = await bearerFor(app, fixture.usersA.admin.email);
    await request(app)
      .patch(`/api/v1/houses/${fixture.houseA}`)
      .set('Authorization', admin)
      .send({ eggPricePerDozen: 2.4 })
      .expect(200);
    const priced = await request(app)
      .get(`/api/v1/exceptions?houseId=${fixture.houseA}&status=live`)
      .set('Authorization', crew);
    expect(priced.body[0].eggsLostValue).toBeCloseTo((priced.body[0].eggsLost / 12) * 2.4, 2);
  });

  it('lets a manager acknowledge and close it, but not the crew; another farm sees nothing', async () => {
    const [crew, manager, adminB] = await Promise.all([
      bearerFor(app, fixture.usersA.crew.email),
      bearerFor(app, fixture.usersA.manager.email),
      bearerFor(app, fixture.adminB.email),
    ]);
    const id = (
      await request(app)
        .get(`/api/v1/exceptions?houseId=${fixture.houseA}`)
        .set('Authorization', manager)
    ).body[0].id;
    expect(
      (await request(app).post(`/api/v1/exceptions/${id}/acknowledge`).set('Authorization', crew))
        .status,
    ).toBe(403);
    expect(
      (await request(app).post(`/api/v1/exceptions/${id}/acknowledge`).set('Authorization', adminB))
        .status,
    ).toBe(404);
    expect(
      (
        await request(app)
          .get(`/api/v1/exceptions?houseId=${fixture.houseA}`)
          .set('Authorization', adminB)
      ).status,
    ).toBe(404);
    const acknowledged = await request(app)
      .post(`/api/v1/exceptions/${id}/acknowledge`)
      .set('Authorization', manager);
    expect(acknowledged.body).toMatchObject({
      status: 'acknowledged',
      acknowledgedBy: 'manager of A',
    });
    expect(
      (
        await request(app)
          .post(`/api/v1/exceptions/${id}/close`)
          .set('Authorization', manager)
          .send({ reason: 'because' })
      ).status,
    ).toBe(400);
    const closed = await request(app)
      .post(`/api/v1/exceptions/${id}/close`)
      .set('Authorization', manager)
      .send({ reason: 'normal_for_spot', note: 'new drinker line, settles in' });
    expect(closed.body).toMatchObject({ status: 'closed', closeReason: 'normal_for_spot' });
    const audit = await database.db.execute<{ action: string }>(
      sql`select action from audit_events where entity = 'exception' order by id`,
    );
    expect(audit.rows.map((r) => r.action)).toEqual([
      'exception.open',
      'exception.acknowledge',
      'exception.close',
    ]);
  });

  it('does not reopen a spot closed as normal for this spot on the same day', async () => {
    await runtime.evaluation.evaluateNow(fixture.houseA, new Date(NOW.getTime() + 2 * 60_000));
    const second = await runtime.evaluation.evaluateNow(
      fixture.houseA,
      new Date(NOW.getTime() + 3 * 60_000),
    );
    expect(second.changed).toEqual([]);
  });
});

describe('historical evaluation', () => {
  it('finds what history would have raised, and finds it once however often it runs', async () => {
    // Farm B's house: a whole row 15 % short for two past days.
    const keyB = await gatewayKeyFor(
      app,
      await bearerFor(app, fixture.adminB.email),
      fixture.farmB,
      'gB',
    );
    const countersB = await countersOfHouse(database.db, fixture.houseB);
    const readings: { counter: string; ts: string; eggs: number }[] = [];
    for (let h = 0; h < 8 * 24; h++) {
      if (h % 24 >= 16) continue;
      const day = Math.floor(h / 24);
      for (const c of countersB.filter((x) => x.kind === 'belt')) {
        const short = c.row === 3 && day >= 6 ? 0.85 : 1;
        readings.push({
          counter: c.externalId,
          ts: new Date(DAY0 + (h + 1) * HOUR).toISOString(),
          eggs: Math.round(eggsFor(c.row!, c.tier!) * short),
        });
      }
    }
    await postReadings(app, keyB, readings);
    const first = await runtime.evaluation.evaluateHistory(
      fixture.houseB,
      '2026-11-12',
      '2026-11-19',
    );
    const opened = [
      ...new Map(
        first.changed.filter((e) => e.kind === 'shortfall').map((e) => [e.id, e]),
      ).values(),
    ];
    expect(opened.map((e) => [e.scope, e.row])).toEqual([['row', 3]]);
    expect(opened[0]!.openedDay).toBe('2026-11-18');
    await runtime.evaluation.evaluateHistory(fixture.houseB, '2026-11-12', '2026-11-19');
    const count = await database.db.execute<{ n: number }>(
      sql`select count(*)::int as n from exceptions where house_id = ${fixture.houseB} and kind = 'shortfall'`,
    );
    expect(count.rows[0]?.n).toBe(1);
  });
});

describe('the live socket', () => {
  let server: Server;
  let url: string;
  let live: ReturnType<typeof attachLive>;

  beforeAll(async () => {
    server = createServer(app);
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    const address = server.address();
    url = `ws://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}/api/v1/live`;
    live = attachLive(server, { db: database.db, ...runtime, log: () => undefined });
  });
  afterAll(async () => {
    live.close();
    await new Promise((resolve) => server.close(resolve));
  });

  /** Opens a socket, signs in, and collects what arrives. */
  async function connect(email: string) {
    const token = (await bearerFor(app, email)).slice('Bearer '.length);
    const socket = new WebSocket(url);
    const messages: {
      type: string;
      houseId?: number;
      code?: string;
      map?: { cells: unknown[] };
    }[] = [];
    socket.on('message', (data: Buffer) => messages.push(JSON.parse(data.toString('utf8'))));
    await new Promise((resolve) => socket.once('open', resolve));
    socket.send(JSON.stringify({ type: 'auth', token }));
    const waitFor = async (test: (m: (typeof messages)[number]) => boolean, ms = 5000) => {
      const deadline = Date.now() + ms;
      while (Date.now() < deadline) {
        const found = messages.find(test);
        if (found) return found;
        await new Promise((r) => setTimeout(r, 20));
      }
      throw new Error(`no such message; got ${JSON.stringify(messages.map((m) => m.type))}`);
    };
    await waitFor((m) => m.type === 'ready');
    return { socket, messages, waitFor };
  }

  it('refuses a user of farm A a house of farm B, without saying it exists', async () => {
    const client = await connect(fixture.usersA.manager.email);
    client.socket.send(JSON.stringify({ type: 'subscribe', houseId: fixture.houseB }));
    expect(await client.waitFor((m) => m.type === 'error')).toMatchObject({
      code: 'not_found',
      houseId: fixture.houseB,
    });
    expect(client.messages.some((m) => m.type === 'snapshot')).toBe(false);
    client.socket.close();
  });

  it('takes a subscribe sent right behind the sign-in, without waiting for the answer', async () => {
    const token = (await bearerFor(app, fixture.usersA.crew.email)).slice('Bearer '.length);
    const socket = new WebSocket(url);
    const types: string[] = [];
    socket.on('message', (data: Buffer) =>
      types.push((JSON.parse(data.toString('utf8')) as { type: string }).type),
    );
    await new Promise((resolve) => socket.once('open', resolve));
    socket.send(JSON.stringify({ type: 'auth', token }));
    socket.send(JSON.stringify({ type: 'subscribe', houseId: fixture.houseA }));
    const deadline = Date.now() + 5000;
    while (!types.includes('snapshot') && Date.now() < deadline)
      await new Promise((r) => setTimeout(r, 20));
    expect(types.slice(0, 2)).toEqual(['ready', 'snapshot']);
    socket.close();
  });

  it('sends a snapshot on subscribe and a new frame after an ingest', async () => {
    const client = await connect(fixture.usersA.crew.email);
    client.socket.send(JSON.stringify({ type: 'subscribe', houseId: fixture.houseA }));
    const snapshot = await client.waitFor((m) => m.type === 'snapshot');
    expect(snapshot.map?.cells).toHaveLength(12);
    await ingest([{ counter: counters[0]!.externalId, ts: new Date().toISOString(), eggs: 5 }]);
    const frame = await client.waitFor((m) => m.type === 'frame');
    expect(frame.houseId).toBe(fixture.houseA);
    client.socket.close();
  });

  it('closes a socket that signs in with a bad token', async () => {
    const socket = new WebSocket(url);
    await new Promise((resolve) => socket.once('open', resolve));
    const closed = new Promise<number>((resolve) =>
      socket.once('close', (code) => {
        resolve(code);
      }),
    );
    socket.send(JSON.stringify({ type: 'auth', token: 'not-a-token' }));
    expect(await closed).toBe(4401);
  });
});
