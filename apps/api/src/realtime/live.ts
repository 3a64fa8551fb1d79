import type { IncomingMessage, Server } from 'node:http';
import type { Duplex } from 'node:stream';
import { liveClientMessageSchema, type LiveServerMessage } from '@tierscope/contracts';
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
const AUTH_TIMEOUT_MS = 10_000;

interface Client {
  socket: WebSocket;
  user: AuthUser | null;
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
  const wss = new WebSocketServer({ noServer: true, maxPayload: 16 * 1024 });
  const clients = new Set<Client>();
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
      houses: new Set(),
      isAlive: true,
      waiting: new Map(),
    };
    clients.add(client);
    const authTimer = setTimeout(() => {
      if (!client.user) socket.close(4401, 'sign in first');
    }, AUTH_TIMEOUT_MS);
    socket.on('pong', () => {
      client.isAlive = true;
    });
    socket.on('close', () => {
      clearTimeout(authTimer);
      clients.delete(client);
    });
    // Text frames arrive as one Buffer (no fragments: maxPayload is small).
    // One message at a time per client, in order: a subscribe sent right after auth waits for the sign-in.
    let queue: Promise<void> = Promise.resolve();
    socket.on('message', (data: Buffer) => {
      queue = queue
        .then(async () => {
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
            const userId = deps.tokens.verify(message.token);
            const user = userId === null ? null : await loadActiveUser(deps.db, userId);
            if (!user) {
              socket.close(4401, 'invalid or expired token');
              return;
            }
            client.user = user;
            clearTimeout(authTimer);
            send(client, { type: 'ready' });
            return;
          }
          if (!client.user) {
            socket.close(4401, 'sign in first');
            return;
          }
          if (message.type === 'unsubscribe') {
            client.houses.delete(message.houseId);
            return;
          }
          // Re-read the user so a role taken away since sign-in counts at once.
          const user = await loadActiveUser(deps.db, client.user.id);
          const house = await findHouse(deps.db, message.houseId);
          if (!user || !house || !user.roles.has(house.farmId)) {
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
        });
    });
  });

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
  }, HEARTBEAT_MS);

  return {
    clientCount: () => clients.size,
    close() {
      clearInterval(heartbeat);
      clearInterval(flush);
      for (const t of frameTimers.values()) clearTimeout(t);
      for (const stop of unsubscribers) stop();
      server.off('upgrade', onUpgrade);
      for (const client of clients) client.socket.terminate();
      wss.close();
    },
  };
}
