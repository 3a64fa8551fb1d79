/**
 * The live WebSocket: sign-in by first message, per-house subscriptions checked against the user's farms,
 * throttled frames, heartbeats, back-pressure and close codes. One file (a little over ~350 lines) because it
 * is one connection's life from upgrade to close; the frames' content comes from the house map service.
 */
import type { IncomingMessage, Server } from 'node:http';
import type { Duplex } from 'node:stream';
import { LIVE_CLOSE, liveClientMessageSchema, type LiveServerMessage } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { WebSocket, WebSocketServer } from 'ws';
import type { AuthUser } from '../platform/auth';
import type { EventBus } from '../platform/events';
import type { TokenService } from '../platform/tokens';
import type { EvaluationService } from '../features/evaluation/evaluation.service';
import type { ExceptionsService } from '../features/exceptions/exceptions.service';
import { findHouse } from '../features/houses/houses.repository';
import { loadActiveUser } from '../features/users/users.repository';

export const LIVE_PATH = '/api/v1/live';
/** A client further behind than this gets only the newest frame when it catches up. */
const MAX_BUFFERED_BYTES = 256 * 1024;
const FRAME_THROTTLE_MS = 100;
const HEARTBEAT_MS = 30_000;
/** A socket that has not signed in by then is closed. */
const AUTH_TIMEOUT_MS = 10_000;
/** The largest message a browser sends is a sign-in with its token: far below this. */
const MAX_MESSAGE_BYTES = 16 * 1024;
/** Houses one socket may watch at once (a person looks at a few; a farm has at most a few dozen). */
export const MAX_SUBSCRIPTIONS = 64;
/**
 * Messages waiting to be handled on one socket (room for re-subscribing every house at once after a
 * reconnect); a client that floods past this is closed.
 */
const MAX_PENDING_MESSAGES = MAX_SUBSCRIPTIONS + 36;

/** Close codes the browser reads: sign in again; or reconnect (access changed, server going away). */
export const CLOSE_SIGN_IN = LIVE_CLOSE.signIn;
export const CLOSE_ACCESS_CHANGED = LIVE_CLOSE.accessChanged;
const CLOSE_POLICY = 1008;

interface Client {
  socket: WebSocket;
  user: AuthUser | null;
  /** the token's own end: the socket closes then, as a request with that token would be refused */
  tokenExpiresAt: Date | null;
  houses: Set<number>;
  isAlive: boolean;
  /** newest frame per house not yet sent because the client was slow */
  waiting: Map<number, string>;
}

export interface LiveDeps {
  db: Database;
  tokens: TokenService;
  events: EventBus;
  evaluation: EvaluationService;
  exceptions: ExceptionsService;
  log: (message: string, error?: unknown) => void;
}

/**
 * The live WebSocket: the client signs in with its token as its first message, subscribes to houses it
 * may see, gets a map snapshot, then a frame whenever the map changes and every exception change.
 */
export function attachLive(
  server: Server,
  deps: LiveDeps,
): { close(): void; clientCount(): number } {
  const wss = new WebSocketServer({ noServer: true, maxPayload: MAX_MESSAGE_BYTES });
  // Errors of the server itself (never of one socket) are logged; they must not stop the process.
  wss.on('error', (error) => {
    deps.log('live socket server error', error);
  });
  const clients = new Set<Client>();
  /** Sockets closed on bad frames, said once per heartbeat rather than once each (a flood must not flood the log). */
  const badFrames = { count: 0, last: '' };
  const frameTimers = new Map<number, ReturnType<typeof setTimeout>>();

  const onUpgrade = (req: IncomingMessage, socket: Duplex, head: Buffer) => {
    const path = (req.url ?? '').split('?')[0];
    if (path !== LIVE_PATH) return;
    wss.handleUpgrade(req, socket, head, (ws) => wss.emit('connection', ws, req));
  };
  server.on('upgrade', onUpgrade);

  const send = (client: Client, message: LiveServerMessage) => {
    if (client.socket.readyState === WebSocket.OPEN) client.socket.send(JSON.stringify(message));
  };

  const sendFrame = (client: Client, houseId: number, text: string) => {
    if (client.socket.readyState !== WebSocket.OPEN) return;
    if (client.socket.bufferedAmount > MAX_BUFFERED_BYTES) {
      // Slow client: keep only the newest frame, never an unbounded queue.
      client.waiting.set(houseId, text);
      return;
    }
    client.socket.send(text);
  };

  const flush = setInterval(() => {
    for (const client of clients) {
      if (client.waiting.size === 0 || client.socket.bufferedAmount > MAX_BUFFERED_BYTES) continue;
      for (const [houseId, text] of client.waiting) {
        client.waiting.delete(houseId);
        client.socket.send(text);
      }
    }
  }, 250);

  const pushFrame = async (houseId: number) => {
    const watchers = [...clients].filter((c) => c.houses.has(houseId));
    if (watchers.length === 0) return;
    const map = await deps.evaluation.buildMap(houseId, 'today');
    if (!map) return;
    const text = JSON.stringify({ type: 'frame', houseId, map } satisfies LiveServerMessage);
    for (const client of watchers) sendFrame(client, houseId, text);
  };

  const scheduleFrame = (houseId: number) => {
    if (frameTimers.has(houseId)) return;
    frameTimers.set(
      houseId,
      setTimeout(() => {
        frameTimers.delete(houseId);
        pushFrame(houseId).catch((error: unknown) => {
          deps.log(`live frame for house ${houseId} failed`, error);
        });
      }, FRAME_THROTTLE_MS),
    );
  };

  const pushExceptions = async (houseId: number, ids: number[]) => {
    const watchers = [...clients].filter((c) => c.houses.has(houseId));
    if (watchers.length === 0) return;
    for (const id of ids) {
      const exception = await deps.exceptions.view(id);
      if (!exception) continue;
      for (const client of watchers) send(client, { type: 'exception', houseId, exception });
    }
  };

  const unsubscribers = [
    deps.events.on('readings.accepted', (e) => {
      scheduleFrame(e.houseId);
    }),
    deps.events.on('house.evaluated', (e) => {
      if (e.changed.length === 0) return;
      scheduleFrame(e.houseId);
      pushExceptions(
        e.houseId,
        e.changed.map((x) => x.id),
      ).catch((error: unknown) => {
        deps.log('live exception push failed', error);
      });
    }),
    deps.events.on('import.progress', (e) => {
      const progress = {
        id: e.id,
        state: e.state,
        linesRead: e.linesRead,
        readingsAdded: e.readingsAdded,
        duplicates: e.duplicates,
        errorCount: e.errorCount,
        bytesRead: e.bytesRead,
        bytes: e.bytes,
      };
      for (const client of clients) {
        if (client.houses.has(e.houseId)) {
          send(client, { type: 'import', houseId: e.houseId, import: progress });
        }
      }
    }),
    deps.events.on('user.access-changed', (e) => {
      for (const client of clients) {
        if (client.user?.id !== e.userId) continue;
        if (e.reason === 'roles') {
          client.socket.close(CLOSE_ACCESS_CHANGED, 'your access changed: reconnect');
        } else client.socket.close(CLOSE_SIGN_IN, 'sign in again');
      }
    }),
    deps.events.on('exception.changed', (e) => {
      scheduleFrame(e.houseId);
      pushExceptions(e.houseId, [e.exception.id]).catch((error: unknown) => {
        deps.log('live exception push failed', error);
      });
    }),
  ];

  wss.on('connection', (socket: WebSocket) => {
    const client: Client = {
      socket,
      user: null,
      tokenExpiresAt: null,
      houses: new Set(),
      isAlive: true,
      waiting: new Map(),
    };
    clients.add(client);
    const authTimer = setTimeout(() => {
      if (!client.user) socket.close(CLOSE_SIGN_IN, 'sign in first');
    }, AUTH_TIMEOUT_MS);
    // A bad frame (invalid UTF-8, unmasked, too large) is an error of this socket only: ws has already
    // started closing it with the right code; without this listener the error would stop the process.
    socket.on('error', (error: Error) => {
      badFrames.count += 1;
      badFrames.last = error.message;
      socket.terminate();
    });
    let pending = 0;
    socket.on('pong', () => {
      client.isAlive = true;
    });
    socket.on('close', () => {
      clearTimeout(authTimer);
      clients.delete(client);
    });
    // Text frames arrive as one Buffer (fragments are joined by ws up to maxPayload).
    // One message at a time per client, in order: a subscribe sent right after auth waits for the sign-in.
    let queue: Promise<void> = Promise.resolve();
    socket.on('message', (data: Buffer, isBinary: boolean) => {
      if (isBinary) {
        socket.close(CLOSE_POLICY, 'messages are JSON text');
        return;
      }
      pending += 1;
      if (pending > MAX_PENDING_MESSAGES) {
        socket.close(CLOSE_POLICY, 'too many messages');
        return;
      }
      queue = queue
        .then(async () => {
          if (socket.readyState !== WebSocket.OPEN) return;
          let raw: unknown;
          try {
            raw = JSON.parse(data.toString('utf8'));
          } catch {
            // Not JSON: say so rather than drop the connection.
            send(client, { type: 'error', code: 'bad_message', message: 'Messages are JSON' });
            return;
          }
          const parsed = liveClientMessageSchema.safeParse(raw);
          if (!parsed.success) {
            send(client, { type: 'error', code: 'bad_message', message: 'Unknown message' });
            return;
          }
          const message = parsed.data;
          if (message.type === 'auth') {
            const claims = deps.tokens.verify(message.token);
            const user = claims === null ? null : await loadActiveUser(deps.db, claims.userId);
            if (!claims || user?.sessionVersion !== claims.sessionVersion) {
              socket.close(CLOSE_SIGN_IN, 'invalid or expired token');
              return;
            }
            client.user = user;
            client.tokenExpiresAt = claims.expiresAt;
            clearTimeout(authTimer);
            send(client, { type: 'ready' });
            return;
          }
          if (!client.user) {
            socket.close(CLOSE_SIGN_IN, 'sign in first');
            return;
          }
          if (message.type === 'unsubscribe') {
            client.houses.delete(message.houseId);
            return;
          }
          if (!client.houses.has(message.houseId) && client.houses.size >= MAX_SUBSCRIPTIONS) {
            send(client, {
              type: 'error',
              code: 'bad_message',
              message: `Watch at most ${MAX_SUBSCRIPTIONS} houses on one connection`,
              houseId: message.houseId,
            });
            return;
          }
          // Re-read the user so a role taken away since sign-in counts at once.
          const user = await loadActiveUser(deps.db, client.user.id);
          if (user?.sessionVersion !== client.user.sessionVersion) {
            socket.close(CLOSE_SIGN_IN, 'sign in again');
            return;
          }
          const house = await findHouse(deps.db, message.houseId);
          if (!house || !user.roles.has(house.farmId)) {
            send(client, {
              type: 'error',
              code: 'not_found',
              message: 'House not found',
              houseId: message.houseId,
            });
            return;
          }
          client.houses.add(house.id);
          const map = await deps.evaluation.buildMap(house.id, 'today');
          if (map) send(client, { type: 'snapshot', houseId: house.id, map });
        })
        .catch((error: unknown) => {
          deps.log('live message failed', error);
          send(client, { type: 'error', code: 'bad_message', message: 'That message failed' });
        })
        .finally(() => {
          pending -= 1;
        });
    });
  });

  /**
   * Every signed-in socket is checked again against the database on each heartbeat: a token that has
   * ended, or a user disabled or reset by any API process, closes the socket within one beat.
   */
  const recheckUsers = async () => {
    const now = Date.now();
    const byUser = new Map<number, Client[]>();
    for (const client of clients) {
      if (!client.user) continue;
      if (client.tokenExpiresAt && client.tokenExpiresAt.getTime() <= now) {
        client.socket.close(CLOSE_SIGN_IN, 'your session has ended');
        continue;
      }
      const list = byUser.get(client.user.id) ?? [];
      list.push(client);
      byUser.set(client.user.id, list);
    }
    for (const [userId, list] of byUser) {
      const user = await loadActiveUser(deps.db, userId);
      for (const client of list) {
        if (!user || user.sessionVersion !== client.user?.sessionVersion) {
          client.socket.close(CLOSE_SIGN_IN, 'sign in again');
        } else {
          // Houses on farms no longer theirs stop at once.
          for (const houseId of client.houses) {
            const house = await findHouse(deps.db, houseId);
            if (!house || !user.roles.has(house.farmId)) client.houses.delete(houseId);
          }
          client.user = user;
        }
      }
    }
  };

  const heartbeat = setInterval(() => {
    for (const client of clients) {
      if (!client.isAlive) {
        client.socket.terminate();
        clients.delete(client);
        continue;
      }
      client.isAlive = false;
      client.socket.ping();
    }
    if (badFrames.count > 0) {
      deps.log(`live: ${badFrames.count} socket(s) closed on bad frames (last: ${badFrames.last})`);
      badFrames.count = 0;
    }
    recheckUsers().catch((error: unknown) => {
      deps.log('live user re-check failed', error);
    });
  }, HEARTBEAT_MS);

  return {
    clientCount: () => clients.size,
    close() {
      clearInterval(heartbeat);
      clearInterval(flush);
      for (const t of frameTimers.values()) clearTimeout(t);
      for (const stop of unsubscribers) stop();
      server.off('upgrade', onUpgrade);
      // Every browser connects again by itself (to another process behind the balancer).
      for (const client of clients)
        client.socket.close(LIVE_CLOSE.restarting, 'server restarting: reconnect');
      wss.close();
    },
  };
}
