import type { Database } from '@tierscope/db';
import { sql } from 'drizzle-orm';
import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';

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
    const result = await this.db.execute<{ hits: number; reset_at: Date | string }>(sql`
      SELECT hits, reset_at FROM rate_limit_hits WHERE key = ${this.key(key)} AND reset_at > now()`);
    const row = result.rows[0];
    return row ? { totalHits: row.hits, resetTime: new Date(row.reset_at) } : undefined;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const window = sql`now() + make_interval(secs => ${this.windowMs / 1000})`;
    const result = await this.db.execute<{ hits: number; reset_at: Date | string }>(sql`
      INSERT INTO rate_limit_hits (key, hits, reset_at) VALUES (${this.key(key)}, 1, ${window})
      ON CONFLICT (key) DO UPDATE SET
        hits = CASE WHEN rate_limit_hits.reset_at <= now() THEN 1 ELSE rate_limit_hits.hits + 1 END,
        reset_at = CASE WHEN rate_limit_hits.reset_at <= now() THEN ${window}
                        ELSE rate_limit_hits.reset_at END
      RETURNING hits, reset_at`);
    await this.sweep();
    const row = result.rows[0];
    return { totalHits: row?.hits ?? 1, resetTime: new Date(row?.reset_at ?? Date.now()) };
  }

  async decrement(key: string): Promise<void> {
    await this.db.execute(sql`
      UPDATE rate_limit_hits SET hits = greatest(0, hits - 1)
      WHERE key = ${this.key(key)} AND reset_at > now()`);
  }

  async resetKey(key: string): Promise<void> {
    await this.db.execute(sql`DELETE FROM rate_limit_hits WHERE key = ${this.key(key)}`);
  }

  private async sweep(): Promise<void> {
    if (Date.now() - this.lastSweep < 60_000) return;
    this.lastSweep = Date.now();
    await this.db.execute(sql`DELETE FROM rate_limit_hits WHERE reset_at <= now()`);
  }
}
