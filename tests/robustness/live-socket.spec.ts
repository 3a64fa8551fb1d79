import { randomBytes } from 'node:crypto';
import { connect } from 'node:net';
import { hash } from '@node-rs/argon2';
import { insertHouseWithLayout, schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import WebSocket from 'ws';
import { hashLinkToken } from '../../apps/api/src/features/notifications/notifier';
import { signInThroughApi, startApiProcess, type ApiProcess } from '../../scripts/processes';

/**
 * The live socket as an attacker or a broken client would use it, against the real API process: whatever
 * arrives on one socket closes that socket at most, the process keeps serving, and a person whose access
 * ends loses their open sockets at once.
 */
let database: Awaited<ReturnType<typeof createTestDatabase>>;
let api: ApiProcess;
let wsUrl: string;
let houseId: number;
let farmId: number;
/** more houses than one socket may watch */
const extraHouseIds: number[] = [];
const PASSWORD = 'live-socket-pass';

beforeAll(async () => {
  database = await createTestDatabase();
  const [farm] = await database.db.insert(schema.farms).values({ name: 'Socket Farm' }).returning();
  farmId = farm!.id;
  const house = await insertHouseWithLayout(database.db, farmId, {
    name: 'House 1',
    rows: 2,
    tiers: 2,
    timezone: 'UTC',
    lightsOn: '04:00',
    photoperiodHours: 16,
    shortfallThresholdPct: 10,
  });
  houseId = house.id;
  for (let i = 0; i < 64; i++) {
    const extra = await insertHouseWithLayout(database.db, farmId, {
      name: `Small house ${i}`,
      rows: 1,
      tiers: 1,
      timezone: 'UTC',
      lightsOn: '04:00',
      photoperiodHours: 16,
      shortfallThresholdPct: 10,
    });
    extraHouseIds.push(extra.id);
  }
  const passwordHash = await hash(PASSWORD);
  for (const [email, role] of [
    ['admin@socket.test', 'admin'],
    ['manager@socket.test', 'manager'],
  ] as const) {
    const [user] = await database.db
      .insert(schema.users)
      .values({ email, name: role, passwordHash })
      .returning();
    await database.db.insert(schema.memberships).values({ userId: user!.id, farmId, role });
  }
  api = await startApiProcess(
    {
      DATABASE_URL: database.url,
      JWT_SECRET: randomBytes(32).toString('hex'),
      DATA_DIR: `/tmp/tierscope-live-${randomBytes(4).toString('hex')}`,
    },
    { stdio: ['ignore', 'ignore', 'ignore'] },
  );
  wsUrl = `${api.baseUrl.replace('http', 'ws')}/api/v1/live`;
}, 90_000);

afterAll(async () => {
  await api.stop();
  await database.drop();
});

/** Resolves with the close code once the server closes the socket. */
function closed(socket: WebSocket): Promise<number> {
  return new Promise((resolve) => {
    socket.on('close', (code) => {
      resolve(code);
    });
    // A close after a protocol error reaches the client as an error first; the close follows.
    socket.on('error', () => undefined);
  });
}

function opened(socket: WebSocket): Promise<void> {
  return new Promise((resolve, reject) => {
    socket.once('open', () => {
      resolve();
    });
    socket.once('error', reject);
  });
}

/** The next JSON message on the socket that matches. */
function nextMessage(
  socket: WebSocket,
  isWanted: (m: { type: string; [k: string]: unknown }) => boolean,
): Promise<{ type: string; [k: string]: unknown }> {
  return new Promise((resolve) => {
    const onMessage = (data: Buffer) => {
      const message = JSON.parse(data.toString('utf8')) as { type: string };
      if (isWanted(message)) {
        socket.off('message', onMessage);
        resolve(message);
      }
    };
    socket.on('message', onMessage);
  });
}

async function isHealthy(): Promise<boolean> {
  const response = await fetch(`${api.baseUrl}/api/health`);
  return response.ok && api.child.exitCode === null;
}

async function signedInSocket(email: string): Promise<{ socket: WebSocket; token: string }> {
  const { token } = await signInThroughApi(api.baseUrl, email, PASSWORD);
  const socket = new WebSocket(wsUrl);
  await opened(socket);
  const ready = nextMessage(socket, (m) => m.type === 'ready');
  socket.send(JSON.stringify({ type: 'auth', token }));
  await ready;
  return { socket, token };
}

describe('the live socket under bad frames', () => {
  it('closes a socket that sends invalid UTF-8 before signing in, and the API keeps running', async () => {
    const socket = new WebSocket(wsUrl);
    await opened(socket);
    const code = closed(socket);
    // A text frame whose bytes are not UTF-8: ws sends them as they are.
    socket.send(Buffer.from([0xff, 0xfe, 0xc3, 0x28]), { binary: false });
    expect(await code).toBe(1007);
    expect(await isHealthy()).toBe(true);
  });

  it('closes a socket that sends an unmasked frame (written by hand), and the API keeps running', async () => {
    const url = new URL(api.baseUrl);
    const raw = connect(Number(url.port), url.hostname);
    await new Promise((resolve) => raw.once('connect', resolve));
    const key = randomBytes(16).toString('base64');
    raw.write(
      `GET /api/v1/live HTTP/1.1\r\nHost: ${url.host}\r\nUpgrade: websocket\r\nConnection: Upgrade\r\n` +
        `Sec-WebSocket-Key: ${key}\r\nSec-WebSocket-Version: 13\r\n\r\n`,
    );
    const received: Buffer[] = [];
    raw.on('data', (chunk: Buffer) => received.push(chunk));
    raw.on('error', () => undefined);
    await new Promise((resolve) => setTimeout(resolve, 200));
    expect(Buffer.concat(received).toString('latin1')).toContain('101 Switching Protocols');
    const ended = new Promise((resolve) => raw.once('close', resolve));
    // FIN + text opcode, payload length 5, mask bit NOT set: clients must mask (RFC 6455 §5.1).
    raw.write(Buffer.concat([Buffer.from([0x81, 0x05]), Buffer.from('hello')]));
    await ended;
    // The server's close frame carries 1002 (protocol error).
    const frames = Buffer.concat(received);
    const closeAt = frames.indexOf(Buffer.from([0x88]));
    expect(closeAt).toBeGreaterThan(0);
    expect(frames.readUInt16BE(closeAt + 2)).toBe(1002);
    expect(await isHealthy()).toBe(true);
  });

  it('closes a socket that sends a frame larger than any message, and binary frames', async () => {
    const big = new WebSocket(wsUrl);
    await opened(big);
    const bigCode = closed(big);
    big.send('x'.repeat(64 * 1024));
    expect(await bigCode).toBe(1009);
    const binary = new WebSocket(wsUrl);
    await opened(binary);
    const binaryCode = closed(binary);
    binary.send(Buffer.from('{"type":"auth","token":"x"}'), { binary: true });
    expect(await binaryCode).toBe(1008);
    expect(await isHealthy()).toBe(true);
  });

  it('closes a socket that floods messages, and one that never signs in is refused its subscribe', async () => {
    const flood = new WebSocket(wsUrl);
    await opened(flood);
    const code = closed(flood);
    for (let i = 0; i < 500; i++) flood.send(JSON.stringify({ type: 'subscribe', houseId }));
    expect([1008, 4401]).toContain(await code);
    const early = new WebSocket(wsUrl);
    await opened(early);
    const earlyCode = closed(early);
    early.send(JSON.stringify({ type: 'subscribe', houseId }));
    expect(await earlyCode).toBe(4401);
    expect(await isHealthy()).toBe(true);
  });

  it('answers a subscribe with an id past PostgreSQL integers, and caps subscriptions per socket', async () => {
    const { socket } = await signedInSocket('manager@socket.test');
    const refused = nextMessage(socket, (m) => m.type === 'error');
    socket.send(JSON.stringify({ type: 'subscribe', houseId: 2 ** 31 }));
    expect(await refused).toMatchObject({ code: 'bad_message' });
    const snapshot = nextMessage(socket, (m) => m.type === 'snapshot');
    socket.send(JSON.stringify({ type: 'subscribe', houseId }));
    expect(await snapshot).toMatchObject({ houseId });
    // The cap counts houses really watched: the one above and the farm's others, then one too many.
    const snapshots: unknown[] = [];
    const overCap = new Promise<{ message?: unknown }>((resolve) => {
      socket.on('message', (data: Buffer) => {
        const m = JSON.parse(data.toString('utf8')) as { type: string; message?: unknown };
        if (m.type === 'snapshot') snapshots.push(m);
        if (m.type === 'error') resolve(m);
      });
    });
    for (const id of extraHouseIds) socket.send(JSON.stringify({ type: 'subscribe', houseId: id }));
    expect((await overCap).message).toBe('Watch at most 64 houses on one connection');
    expect(snapshots).toHaveLength(extraHouseIds.length - 1);
    socket.close();
    expect(await isHealthy()).toBe(true);
  });
});

describe('the live socket when access ends', () => {
  it('closes the open sockets of a user who is disabled', async () => {
    const { socket } = await signedInSocket('manager@socket.test');
    const code = closed(socket);
    const admin = await signInThroughApi(api.baseUrl, 'admin@socket.test', PASSWORD);
    const [manager] = await database.db
      .select()
      .from(schema.users)
      .where(eq(schema.users.email, 'manager@socket.test'));
    const response = await fetch(`${api.baseUrl}/api/v1/users/${manager!.id}`, {
      method: 'PATCH',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${admin.token}` },
      body: JSON.stringify({ disabled: true }),
    });
    expect(response.status).toBe(200);
    expect(await code).toBe(4401);
    // Enabled again for the tests after this one.
    await database.db
      .update(schema.users)
      .set({ disabled: false })
      .where(eq(schema.users.id, manager!.id));
  });

  it('closes the open sockets of a user whose roles change', async () => {
    const { socket } = await signedInSocket('manager@socket.test');
    const code = closed(socket);
    const admin = await signInThroughApi(api.baseUrl, 'admin@socket.test', PASSWORD);
    const [manager] = await database.db
      .select()
      .from(schema.users)
      .where(eq(schema.users.email, 'manager@socket.test'));
    const response = await fetch(`${api.baseUrl}/api/v1/users/${manager!.id}`, {
      method: 'PATCH',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${admin.token}` },
      body: JSON.stringify({ memberships: [{ farmId, role: 'crew' }] }),
    });
    expect(response.status).toBe(200);
    expect(await code).toBe(4403);
  });

  it('closes the open sockets of a user who resets their password, and refuses their old token', async () => {
    const { socket, token } = await signedInSocket('admin@socket.test');
    const code = closed(socket);
    const [admin] = await database.db
      .select()
      .from(schema.users)
      .where(eq(schema.users.email, 'admin@socket.test'));
    // A reset link as the mail would carry it (stored as its SHA-256, as the notifier stores it).
    const link = randomBytes(24).toString('hex');
    await database.db.insert(schema.userTokens).values({
      userId: admin!.id,
      purpose: 'password_reset',
      tokenHash: hashLinkToken(link),
      expiresAt: new Date(Date.now() + 3600_000),
    });
    const reset = await fetch(`${api.baseUrl}/api/v1/auth/set-password`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ token: link, password: 'a new password after reset' }),
    });
    expect(reset.status).toBe(200);
    expect(await code).toBe(4401);
    const me = await fetch(`${api.baseUrl}/api/v1/auth/me`, {
      headers: { authorization: `Bearer ${token}` },
    });
    expect(me.status).toBe(401);
    // The old token no longer opens a socket either.
    const again = new WebSocket(wsUrl);
    await opened(again);
    const refused = closed(again);
    again.send(JSON.stringify({ type: 'auth', token }));
    expect(await refused).toBe(4401);
  });
});
