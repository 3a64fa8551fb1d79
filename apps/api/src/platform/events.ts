import type { ImportState } from '@tierscope/domain';
import { EventEmitter } from 'node:events';
import type { schema } from '@tierscope/db';

/**
 * What services announce; the realtime module and the shortfall engine listen. Services never touch sockets.
 * Every payload must survive JSON (with Dates) — the cluster bus carries it to the other API processes.
 */
export interface DomainEvents {
  /** New readings landed for a house (only readings that were actually new). */
  'readings.accepted': {
    farmId: number;
    houseId: number;
    readingsAdded: number;
    eggsAdded: number;
    firstTs: Date;
    lastTs: Date;
    /** a historical import, or held readings just placed: replay all of their days, not only the last two months */
    replayAllDays?: boolean;
  };
  /** The shortfall engine evaluated a house; `changed` lists exceptions opened, updated or closed. */
  'house.evaluated': {
    farmId: number;
    houseId: number;
    changed: (typeof schema.exceptions.$inferSelect)[];
  };
  /** A historical import moved on (progress while running, then its end). */
  'import.progress': {
    id: number;
    farmId: number;
    houseId: number;
    state: ImportState;
    linesRead: number;
    readingsAdded: number;
    duplicates: number;
    errorCount: number;
    bytesRead: number;
    bytes: number;
  };
  /** A person's access changed: disabled, roles changed, or password reset (older tokens retired). */
  'user.access-changed': {
    userId: number;
    reason: 'disabled' | 'roles' | 'password';
  };
  /** A flock was placed, changed or ended, or its mortality recorded (its lay-curve fit changes). */
  'flock.changed': { farmId: number; houseId: number };
  /** A person acknowledged or closed an exception. */
  'exception.changed': {
    farmId: number;
    houseId: number;
    exception: typeof schema.exceptions.$inferSelect;
  };
}

export interface ListenOptions {
  /** hear only this process's own events (work the emitting process does, e.g. evaluating its readings) */
  localOnly?: boolean;
}

export interface EventBus {
  emit<K extends keyof DomainEvents>(name: K, payload: DomainEvents[K]): void;
  on<K extends keyof DomainEvents>(
    name: K,
    listener: (payload: DomainEvents[K]) => void,
    options?: ListenOptions,
  ): () => void;
}

/**
 * The in-process bus (one process, tests). The API server uses the cluster bus (cluster-events.ts), which
 * adds the other processes' events through PostgreSQL.
 */
export function createEventBus(): EventBus {
  const emitter = new EventEmitter();
  // Many houses and listeners per process are normal, not a leak.
  emitter.setMaxListeners(0);
  return {
    emit(name, payload) {
      emitter.emit(name, payload);
    },
    on(name, listener) {
      emitter.on(name, listener);
      return () => emitter.off(name, listener);
    },
  };
}
