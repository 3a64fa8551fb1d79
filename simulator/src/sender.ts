import type { Reading } from './house-model';

export interface SenderOptions {
  apiUrl: string;
  gatewayKey: string;
  log: (line: string) => void;
  /** Batches in flight at once; the queue itself is unbounded so nothing is ever dropped while the API is away. */
  concurrency?: number;
  fetchImpl?: typeof fetch;
}

/**
 * Posts batches of readings, keeping every batch until the API has answered it. A network error, a 5xx or a
 * 429 puts the batch back and retries with backoff (re-sending is safe: the API counts a reading once).
 */
export class Sender {
  private readonly queue: Reading[][] = [];
  private inFlight = 0;
  private retryDelayMs = 0;
  private isPaused = false;
  private lastBacklogLog = 0;
  private readonly waiters: (() => void)[] = [];
  readonly stats = {
    batchesSent: 0,
    readingsSent: 0,
    eggsSent: 0,
    accepted: 0,
    duplicates: 0,
    rejected: 0,
    retries: 0,
  };
  private fatal: Error | null = null;

  constructor(private readonly options: SenderOptions) {}

  get backlog(): { batches: number; readings: number } {
    return {
      batches: this.queue.length + this.inFlight,
      readings: this.queue.reduce((n, b) => n + b.length, 0),
    };
  }

  enqueue(batch: Reading[]): void {
    if (batch.length === 0) return;
    this.queue.push(batch);
    this.pump();
  }

  /** Resolves when the queue is at most `limit` batches long (backpressure for backfills). */
  async whenBelow(limit: number): Promise<void> {
    while (this.queue.length > limit) {
      if (this.fatal) throw this.fatal;
      await new Promise<void>((resolve) => this.waiters.push(resolve));
    }
  }

  /** Resolves when every batch has been answered. */
  async drain(): Promise<void> {
    while (this.queue.length > 0 || this.inFlight > 0) {
      if (this.fatal) throw this.fatal;
      await new Promise<void>((resolve) => this.waiters.push(resolve));
    }
    if (this.fatal) throw this.fatal;
  }

  private wake(): void {
    for (const resolve of this.waiters.splice(0)) resolve();
  }

  private pump(): void {
    while (
      this.inFlight < (this.options.concurrency ?? 2) &&
      this.queue.length > 0 &&
      !this.isPaused
    ) {
      const batch = this.queue.shift();
      if (!batch) break;
      this.inFlight += 1;
      void this.send(batch).finally(() => {
        this.inFlight -= 1;
        this.wake();
        this.pump();
      });
    }
  }

  private async send(batch: Reading[]): Promise<void> {
    const fetchImpl = this.options.fetchImpl ?? fetch;
    let failure: string;
    try {
      const response = await fetchImpl(`${this.options.apiUrl}/api/v1/ingest/readings`, {
        method: 'POST',
        headers: {
          'content-type': 'application/json',
          authorization: `Bearer ${this.options.gatewayKey}`,
        },
        body: JSON.stringify({ readings: batch }),
        signal: AbortSignal.timeout(30_000),
      });
      if (response.ok) {
        const result = (await response.json()) as {
          accepted: number;
          duplicates: number;
          rejected: unknown[];
        };
        this.stats.batchesSent += 1;
        this.stats.readingsSent += batch.length;
        this.stats.eggsSent += batch.reduce((n, r) => n + r.eggs, 0);
        this.stats.accepted += result.accepted;
        this.stats.duplicates += result.duplicates;
        this.stats.rejected += result.rejected.length;
        if (result.rejected.length > 0)
          this.options.log(
            `API rejected ${result.rejected.length} readings: ${JSON.stringify(result.rejected.slice(0, 3))}`,
          );
        this.retryDelayMs = 0;
        return;
      }
      if (response.status === 401 || response.status === 403) {
        this.fatal = new Error(
          `the API refused the gateway key (${response.status}): check the key or make a new one`,
        );
        this.wake();
        return;
      }
      if (response.status >= 400 && response.status < 500 && response.status !== 429) {
        // A batch the API will never take; keeping it would block the queue forever.
        this.options.log(
          `API answered ${response.status} to a batch of ${batch.length}: dropped. ${await response.text()}`,
        );
        return;
      }
      failure = `API answered ${response.status}`;
    } catch (error) {
      failure =
        error instanceof Error
          ? error.cause instanceof Error
            ? error.cause.message
            : error.message
          : String(error);
    }
    // Keep the batch: put it back at the front and wait before trying again.
    this.queue.unshift(batch);
    this.stats.retries += 1;
    this.retryDelayMs = Math.min(5000, Math.max(250, this.retryDelayMs * 2));
    const now = Date.now();
    if (now - this.lastBacklogLog > 2000) {
      this.lastBacklogLog = now;
      const { batches, readings } = this.backlog;
      this.options.log(
        `${failure}: ${batches} batches (${readings} readings) waiting, retrying in ${this.retryDelayMs / 1000} s`,
      );
    }
    if (!this.isPaused) {
      this.isPaused = true;
      setTimeout(() => {
        this.isPaused = false;
        this.pump();
      }, this.retryDelayMs);
    }
  }
}
