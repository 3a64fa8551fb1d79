import { randomUUID } from 'node:crypto';
import { EventEmitter } from 'node:events';
import type { Database } from '@tierscope/db';
import pg from 'pg';
import {
  deleteEventPayloadsBefore,
  notify,
  readEventPayload,
  storeEventPayload,
} from './cluster.repository';
import type { DomainEvents, EventBus, ListenOptions } from './events';

/** The PostgreSQL channel every API process listens on. */
export const EVENTS_CHANNEL = 'tierscope_events';
/** NOTIFY payloads must stay under 8,000 bytes; larger events travel through `event_payloads`. */
const MAX_INLINE_BYTES = 7000;
/** How long a large event's body is kept for the processes to read it. */
const PAYLOAD_KEEP_MS = 10 * 60_000;

interface Envelope {
  /** the process that emitted it (its own listeners heard it already) */
  origin: string;
  name: keyof DomainEvents;
  body?: unknown;
  /** id in event_payloads when the body was too large to travel inline */
  ref?: number;
}

/** JSON that keeps Date objects (event payloads carry timestamps). */
function encode(value: unknown): string {
  return JSON.stringify(value, function (this: Record<string, unknown>, key, v: unknown) {
    const raw = this[key];
    return raw instanceof Date ? { $date: raw.toISOString() } : v;
  });
}

function revive(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(revive);
  if (value && typeof value === 'object') {
    const record = value as Record<string, unknown>;
    const keys = Object.keys(record);
    if (keys.length === 1 && keys[0] === '$date' && typeof record['$date'] === 'string')
      return new Date(record['$date']);
    return Object.fromEntries(keys.map((k) => [k, revive(record[k])]));
  }
  return value;
}

export interface ClusterEventBus extends EventBus {
  /** this process's id on the bus */
  readonly processId: string;
  /** resolves once the LISTEN connection is up */
  ready(): Promise<void>;
  close(): Promise<void>;
}

/**
 * The domain events of every API process on one PostgreSQL (LISTEN/NOTIFY). A process's own listeners
 * hear its events at once, in order, as with the in-process bus; the other processes hear them through a
 * NOTIFY sent by the same emit. Listeners registered with `{ localOnly: true }` hear only their own
 * process (work that one process must do, such as evaluating the house whose readings it stored).
 *
 * A lost LISTEN connection is re-opened (after 1 s, then up to 30 s between attempts); events sent while
 * it was down are not heard again by that process — the minute sweep and the socket heartbeat make up for
 * them.
 */
export function createClusterEventBus(
  db: Database,
  databaseUrl: string,
  log: (message: string, error?: unknown) => void,
): ClusterEventBus {
  const processId = randomUUID();
  // Per-process listener lists only: what they hear is every process's events (or, for `local`, this one's).
  const everyone = new EventEmitter();
  const local = new EventEmitter();
  everyone.setMaxListeners(0);
  local.setMaxListeners(0);
  let client: pg.Client | null = null;
  let isClosed = false;
  let retryMs = 1000;
  let lastCleanup = 0;
  let resolveReady: () => void = () => undefined;
  const readyPromise = new Promise<void>((resolve) => {
    resolveReady = resolve;
  });

  const deliver = async (envelope: Envelope) => {
    let body = envelope.body;
    if (envelope.ref !== undefined) {
      body = await readEventPayload(db, envelope.ref);
      if (body === undefined) return;
    }
    everyone.emit(envelope.name, revive(body));
  };

  const connect = async () => {
    if (isClosed) return;
    const next = new pg.Client({ connectionString: databaseUrl });
    next.on('error', (error) => {
      log('event bus connection lost; reconnecting', error);
      reconnect(next);
    });
    next.on('end', () => {
      reconnect(next);
    });
    next.on('notification', (message) => {
      if (message.channel !== EVENTS_CHANNEL || !message.payload) return;
      let envelope: Envelope;
      try {
        envelope = JSON.parse(message.payload) as Envelope;
      } catch {
        return;
      }
      if (envelope.origin === processId) return;
      deliver(envelope).catch((error: unknown) => {
        log(`event ${envelope.name} from another process could not be read`, error);
      });
    });
    try {
      await next.connect();
      await next.query(`LISTEN ${EVENTS_CHANNEL}`);
      client = next;
      retryMs = 1000;
      resolveReady();
    } catch (error) {
      log('event bus cannot listen yet; retrying', error);
      reconnect(next);
    }
  };

  const reconnect = (failed: pg.Client) => {
    if (isClosed || (client !== null && client !== failed)) return;
    client = null;
    void failed.end().catch(() => undefined);
    const wait = retryMs;
    retryMs = Math.min(30_000, retryMs * 2);
    setTimeout(() => void connect(), wait).unref();
  };

  const publish = async (name: keyof DomainEvents, payload: unknown) => {
    // Encoded once on every emit; only a body too large to travel inline is encoded again for its row.
    let text = encode({ origin: processId, name, body: payload } satisfies Envelope);
    if (Buffer.byteLength(text) > MAX_INLINE_BYTES) {
      const ref = await storeEventPayload(db, JSON.parse(encode(payload)) as unknown);
      text = JSON.stringify({ origin: processId, name, ref } satisfies Envelope);
      if (Date.now() - lastCleanup > 60_000) {
        lastCleanup = Date.now();
        await deleteEventPayloadsBefore(db, new Date(Date.now() - PAYLOAD_KEEP_MS));
      }
    }
    await notify(db, EVENTS_CHANNEL, text);
  };

  void connect();

  return {
    processId,
    emit(name, payload) {
      local.emit(name, payload);
      everyone.emit(name, payload);
      publish(name, payload).catch((error: unknown) => {
        log(`event ${name} could not be sent to the other processes`, error);
      });
    },
    on(name, listener, options?: ListenOptions) {
      const emitter = options?.localOnly ? local : everyone;
      emitter.on(name, listener);
      return () => emitter.off(name, listener);
    },
    ready: () => readyPromise,
    async close() {
      isClosed = true;
      const current = client;
      client = null;
      await current?.end().catch(() => undefined);
    },
  };
}
