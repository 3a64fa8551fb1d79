import type { Database } from '@tierscope/db';
import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';
import {
  countLimitHit,
  deleteExpiredLimits,
  readLimit,
  resetLimit,
  uncountLimitHit,
} from './cluster.repository';

/**
 * express-rate-limit's counts kept in PostgreSQL (`rate_limit_hits`), so a limit holds across every API
 * process: N processes behind a balancer allow the same number of failed sign-ins as one. Each count is one
 * upsert (a window that ran out starts again at 1); expired rows are swept at most once a minute.
 */
export class PostgresRateLimitStore implements Store {
  readonly localKeys = false;
  private windowMs = 60_000;
  private lastSweep = 0;

  constructor(
    private readonly db: Database,
    readonly prefix: string,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  private key(key: string): string {
    return `${this.prefix}:${key}`;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const count = await readLimit(this.db, this.key(key));
    return count ? { totalHits: count.hits, resetTime: count.resetAt } : undefined;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const count = await countLimitHit(this.db, this.key(key), this.windowMs);
    if (Date.now() - this.lastSweep > 60_000) {
      this.lastSweep = Date.now();
      await deleteExpiredLimits(this.db);
    }
    return { totalHits: count.hits, resetTime: count.resetAt };
  }

  async decrement(key: string): Promise<void> {
    await uncountLimitHit(this.db, this.key(key));
  }

  async resetKey(key: string): Promise<void> {
    await resetLimit(this.db, this.key(key));
  }
}
