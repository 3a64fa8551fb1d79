import { randomUUID } from 'node:crypto';
import { addDays, productionDayOf } from '@tierscope/domain';
import {
  clearReplayPending,
  isReplayPendingElsewhere,
  markReplayPending,
} from '../../platform/cluster.repository';
import { withLease } from '../../platform/leases';
import type { EventBus } from '../../platform/events';
import type { EvaluationService } from './evaluation.service';
import { findHouse } from '../houses/houses.repository';
import type { Database } from '@tierscope/db';

/** How often one house may be evaluated after new readings (coalescing bursts of batches). */
export const EVALUATION_INTERVAL_MS = 2000;
/** Quiet time after past-day readings before their days are evaluated (imports send many batches). */
export const HISTORY_QUIET_MS = 3000;
/** How long an evaluation waits for another process to finish the same house before trying later. */
export const LEASE_WAIT_MS = 30_000;
/** How long a replay mark holds other processes' live runs back (renewed as batches come; cleared after). */
export const REPLAY_MARK_MS = 120_000;
/** The lease a house's evaluation holds (platform/leases.ts). */
export const houseLease = (houseId: number) => `house:${houseId}`;
/** Readings younger than this are live data (no replay of past days). */
export const LIVE_DATA_MS = 3_600_000;
/** The longest history one pass re-evaluates after live readings for past days. */
export const MAX_HISTORY_DAYS = 62;
/** The longest history one pass re-evaluates after a historical import (a background job of minutes). */
export const MAX_IMPORT_HISTORY_DAYS = 400;

export interface SchedulerOptions {
  /** how often one house may be evaluated after new readings */
  intervalMs?: number;
  /** this process's name on the house leases (one process evaluates a house at a time) */
  holder?: string;
  /** when given, one line per evaluation (LOG_EVALUATIONS) */
  trace?: (line: string) => void;
}

/**
 * Evaluates a house after readings touched it — at once if it has been quiet, then at most every two
 * seconds — and past days after readings for them stopped arriving. Errors are logged, never thrown into
 * the ingest path. `tick()` evaluates every house (silent counters need time to pass, not data).
 */
export class EvaluationScheduler {
  private readonly lastRun = new Map<number, number>();
  private readonly pending = new Map<number, ReturnType<typeof setTimeout>>();
  /** the last piece of work on each house in this process: the next one starts after it settles */
  private readonly running = new Map<number, Promise<void>>();
  /** a live evaluation waiting its turn: later triggers join it (it reads what they stored) */
  private readonly queued = new Map<number, Promise<void>>();
  /** history replays under way (their entry leaves `history` when they start) */
  private replaying = 0;
  private readonly replayingHouses = new Set<number>();
  /** each house's latest write of its replay mark */
  private readonly marking = new Map<number, Promise<void>>();
  private readonly history = new Map<
    number,
    { firstTs: Date; maxDays: number; timer: ReturnType<typeof setTimeout> }
  >();
  private readonly stop: () => void;
  private readonly intervalMs: number;
  private readonly holder: string;
  private readonly trace: ((line: string) => void) | undefined;

  constructor(
    private readonly db: Database,
    private readonly evaluation: EvaluationService,
    events: EventBus,
    private readonly log: (message: string, error?: unknown) => void,
    options: SchedulerOptions = {},
  ) {
    this.intervalMs = options.intervalMs ?? EVALUATION_INTERVAL_MS;
    this.holder = options.holder ?? randomUUID();
    this.trace = options.trace;
    // Local only: the process that stored the readings evaluates them (the others hear them for their sockets).
    this.stop = events.on(
      'readings.accepted',
      (e) => {
        // Readings of the last hour are today's live data: the live evaluation judges what they complete.
        // Older ones (a backfill, a gateway's backlog, an import) are replayed through the days they touch.
        if (e.replayAllDays || Date.now() - e.firstTs.getTime() > LIVE_DATA_MS)
          this.scheduleHistory(
            e.houseId,
            e.firstTs,
            e.replayAllDays ? MAX_IMPORT_HISTORY_DAYS : MAX_HISTORY_DAYS,
          );
        this.schedule(e.houseId);
      },
      { localOnly: true },
    );
  }

  schedule(houseId: number): void {
    if (this.pending.has(houseId)) return;
    const wait = Math.max(0, (this.lastRun.get(houseId) ?? 0) + this.intervalMs - Date.now());
    this.pending.set(
      houseId,
      setTimeout(() => {
        this.pending.delete(houseId);
        void this.run(houseId);
      }, wait),
    );
  }

  private async run(houseId: number): Promise<void> {
    // Past days still to be replayed come first: judging today before them would judge it without the
    // exceptions and CUSUM they bring (the replay evaluates today itself when it ends).
    if (this.history.has(houseId) || this.replayingHouses.has(houseId)) return;
    // …also when another process waits to replay them (it evaluates today after its replay).
    if (await isReplayPendingElsewhere(this.db, houseId, this.holder)) return;
    const waiting = this.queued.get(houseId);
    if (waiting) return waiting;
    // One process of the cluster evaluates a house at a time (the lease; another one busy with it is waited
    // for, and after too long this one tries later), and this process one piece of work at a time (exclusive).
    const job = this.exclusive(houseId, async () => {
      this.queued.delete(houseId);
      this.lastRun.set(houseId, Date.now());
      const outcome = await withLease(
        this.db,
        houseLease(houseId),
        this.holder,
        () => this.traced(houseId, 'live', () => this.evaluation.evaluateNow(houseId)),
        { waitMs: LEASE_WAIT_MS },
      );
      if (!outcome.ran) this.schedule(houseId);
    }).catch((error: unknown) => {
      this.log(`evaluation of house ${houseId} failed`, error);
    });
    this.queued.set(houseId, job);
    await job;
  }

  /**
   * Runs work on a house after the work already started or waiting on it in this process, never beside it:
   * the lease keeps other processes out, but would let this process's own second caller in.
   */
  private exclusive<T>(houseId: number, work: () => Promise<T>): Promise<T> {
    const previous = this.running.get(houseId) ?? Promise.resolve();
    const job = previous.then(work);
    const settled = job.then(
      () => undefined,
      () => undefined,
    );
    this.running.set(houseId, settled);
    void settled.then(() => {
      if (this.running.get(houseId) === settled) this.running.delete(houseId);
    });
    return job;
  }

  private scheduleHistory(houseId: number, firstTs: Date, maxDays: number): void {
    const entry = this.history.get(houseId);
    if (entry) clearTimeout(entry.timer);
    const earliest = entry && entry.firstTs < firstTs ? entry.firstTs : firstTs;
    this.history.set(houseId, {
      firstTs: earliest,
      maxDays: Math.max(maxDays, entry?.maxDays ?? 0),
      timer: setTimeout(() => void this.runHistory(houseId), HISTORY_QUIET_MS),
    });
    this.markReplay(houseId);
  }

  private async runHistory(houseId: number): Promise<void> {
    const entry = this.history.get(houseId);
    this.history.delete(houseId);
    if (!entry) return;
    this.replaying += 1;
    this.replayingHouses.add(houseId);
    this.markReplay(houseId);
    // A long replay (a year's import) keeps its mark fresh, so no page says its days are judged too soon.
    const renewal = setInterval(() => {
      this.markReplay(houseId);
    }, REPLAY_MARK_MS / 3);
    try {
      const house = await findHouse(this.db, houseId);
      if (!house) return;
      const today = productionDayOf(new Date(), house.timezone, house.lightsOn);
      const firstDay = productionDayOf(entry.firstTs, house.timezone, house.lightsOn);
      if (firstDay > today) return;
      const start =
        firstDay < addDays(today, -entry.maxDays) ? addDays(today, -entry.maxDays) : firstDay;
      const outcome = await this.exclusive(houseId, () =>
        withLease(
          this.db,
          houseLease(houseId),
          this.holder,
          () =>
            this.traced(houseId, `days ${start}..${today}`, () =>
              this.evaluation.evaluateHistory(houseId, start, today),
            ),
          { waitMs: LEASE_WAIT_MS },
        ),
      );
      if (!outcome.ran) {
        this.scheduleHistory(houseId, entry.firstTs, entry.maxDays);
        return;
      }
      // Then today, so live state continues from the replayed days.
      this.replayingHouses.delete(houseId);
      await this.run(houseId);
    } catch (error) {
      this.log(`historical evaluation of house ${houseId} failed`, error);
    } finally {
      clearInterval(renewal);
      this.replayingHouses.delete(houseId);
      this.replaying -= 1;
      if (!this.history.has(houseId)) {
        // A renewal still under way would write the mark again after it is cleared.
        await this.marking.get(houseId);
        await clearReplayPending(this.db, houseId, this.holder).catch((error: unknown) => {
          this.log(`replay mark of house ${houseId} not cleared`, error);
        });
      }
    }
  }

  /**
   * Runs one evaluation and, when tracing, writes one line for it: house, what was judged, this process,
   * and when it started and ended (the cluster suite checks from these that no two processes ever
   * evaluated one house at once; an operator sees who evaluates what).
   */
  private async traced<T>(houseId: number, what: string, work: () => Promise<T>): Promise<T> {
    if (!this.trace) return work();
    const started = new Date();
    try {
      return await work();
    } finally {
      this.trace(
        `evaluation house=${houseId} holder=${this.holder} started=${started.toISOString()} ended=${new Date().toISOString()} (${what})`,
      );
    }
  }

  /** Tells the other processes a replay of this house is coming (their live runs wait for it). */
  private markReplay(houseId: number): void {
    const marking = markReplayPending(this.db, houseId, this.holder, REPLAY_MARK_MS).catch(
      (error: unknown) => {
        this.log(`replay mark of house ${houseId} not written`, error);
      },
    );
    this.marking.set(houseId, marking);
  }

  /** Evaluates every given house now (the periodic timer). */
  async tick(houseIds: number[]): Promise<void> {
    for (const id of houseIds) await this.run(id);
  }

  /** Waits for all scheduled and running work (tests). */
  async idle(): Promise<void> {
    while (
      this.pending.size > 0 ||
      this.running.size > 0 ||
      this.history.size > 0 ||
      this.replaying > 0
    ) {
      await new Promise((r) => setTimeout(r, 20));
    }
  }

  dispose(): void {
    this.stop();
    for (const t of this.pending.values()) clearTimeout(t);
    for (const h of this.history.values()) clearTimeout(h.timer);
  }
}
