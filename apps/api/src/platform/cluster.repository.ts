import { schema, type Database } from '@tierscope/db';
import { eq, lt, sql } from 'drizzle-orm';

/** What several API processes share beside the data (db/schema/cluster.ts): leases, limits, events. */

/**
 * Claims the lease `name` for `holder` for `ms` — when nobody holds it, its holder's time ran out, or the
 * holder already has it (renewal). One statement: two processes claiming at once never both get it.
 */
export async function claimLease(
  db: Database,
  name: string,
  holder: string,
  ms: number,
): Promise<boolean> {
  const result = await db.execute(sql`
    INSERT INTO leases (name, holder, until)
    VALUES (${name}, ${holder}, now() + make_interval(secs => ${ms / 1000}))
    ON CONFLICT (name) DO UPDATE SET holder = excluded.holder, until = excluded.until
      WHERE leases.until < now() OR leases.holder = excluded.holder
    RETURNING name`);
  return result.rows.length > 0;
}

/** Gives a lease back early (only its holder can). */
export async function releaseLease(db: Database, name: string, holder: string): Promise<void> {
  await db.execute(sql`DELETE FROM leases WHERE name = ${name} AND holder = ${holder}`);
}

export interface LimitCount {
  hits: number;
  resetAt: Date;
}

export async function readLimit(db: Database, key: string): Promise<LimitCount | undefined> {
  const result = await db.execute<{ hits: number; reset_at: Date | string }>(sql`
    SELECT hits, reset_at FROM rate_limit_hits WHERE key = ${key} AND reset_at > now()`);
  const row = result.rows[0];
  return row ? { hits: row.hits, resetAt: new Date(row.reset_at) } : undefined;
}

/** One more hit in the key's window; a window that ran out starts again at 1. */
export async function countLimitHit(
  db: Database,
  key: string,
  windowMs: number,
): Promise<LimitCount> {
  const window = sql`now() + make_interval(secs => ${windowMs / 1000})`;
  const result = await db.execute<{ hits: number; reset_at: Date | string }>(sql`
    INSERT INTO rate_limit_hits (key, hits, reset_at) VALUES (${key}, 1, ${window})
    ON CONFLICT (key) DO UPDATE SET
      hits = CASE WHEN rate_limit_hits.reset_at <= now() THEN 1 ELSE rate_limit_hits.hits + 1 END,
      reset_at = CASE WHEN rate_limit_hits.reset_at <= now() THEN ${window}
                      ELSE rate_limit_hits.reset_at END
    RETURNING hits, reset_at`);
  const row = result.rows[0];
  return { hits: row?.hits ?? 1, resetAt: new Date(row?.reset_at ?? Date.now()) };
}

export async function uncountLimitHit(db: Database, key: string): Promise<void> {
  await db.execute(sql`
    UPDATE rate_limit_hits SET hits = greatest(0, hits - 1) WHERE key = ${key} AND reset_at > now()`);
}

export async function resetLimit(db: Database, key: string): Promise<void> {
  await db.execute(sql`DELETE FROM rate_limit_hits WHERE key = ${key}`);
}

export async function deleteExpiredLimits(db: Database): Promise<void> {
  await db.execute(sql`DELETE FROM rate_limit_hits WHERE reset_at <= now()`);
}

/** Keeps an event body too large for a NOTIFY; returns its id. */
export async function storeEventPayload(db: Database, body: unknown): Promise<number> {
  const [row] = await db
    .insert(schema.eventPayloads)
    .values({ body })
    .returning({ id: schema.eventPayloads.id });
  if (!row) throw new Error('event payload not stored');
  return row.id;
}

export async function readEventPayload(db: Database, id: number): Promise<unknown> {
  const [row] = await db
    .select({ body: schema.eventPayloads.body })
    .from(schema.eventPayloads)
    .where(eq(schema.eventPayloads.id, id));
  return row?.body;
}

export async function deleteEventPayloadsBefore(db: Database, before: Date): Promise<void> {
  await db.delete(schema.eventPayloads).where(lt(schema.eventPayloads.createdAt, before));
}

export async function notify(db: Database, channel: string, text: string): Promise<void> {
  await db.execute(sql`SELECT pg_notify(${channel}, ${text})`);
}

/**
 * A process waiting to replay a house's past days says so (a row per process in `leases`, named
 * `replay:<house>:<process>`), so no other process judges that house's today before the replay.
 */
export async function markReplayPending(
  db: Database,
  houseId: number,
  holder: string,
  ms: number,
): Promise<void> {
  await db.execute(sql`
    INSERT INTO leases (name, holder, until)
    VALUES (${`replay:${houseId}:${holder}`}, ${holder}, now() + make_interval(secs => ${ms / 1000}))
    ON CONFLICT (name) DO UPDATE SET until = excluded.until`);
}

export async function isReplayPendingElsewhere(
  db: Database,
  houseId: number,
  holder: string,
): Promise<boolean> {
  const result = await db.execute(sql`
    SELECT 1 FROM leases
    WHERE name LIKE ${`replay:${houseId}:%`} AND holder <> ${holder} AND until > now() LIMIT 1`);
  return result.rows.length > 0;
}

/**
 * The houses (of those given) whose past days some process is about to judge or judging now: their map and
 * exceptions are still filling in.
 */
export async function housesJudgingPastDays(
  db: Database,
  houseIds: number[],
): Promise<Set<number>> {
  if (houseIds.length === 0) return new Set();
  const result = await db.execute<{ house_id: number }>(sql`
    SELECT DISTINCT split_part(name, ':', 2)::int AS house_id FROM leases
    WHERE name LIKE 'replay:%' AND until > now()
      AND split_part(name, ':', 2)::int = ANY(${sql.param(houseIds)}::int[])`);
  return new Set(result.rows.map((r) => r.house_id));
}

export async function clearReplayPending(
  db: Database,
  houseId: number,
  holder: string,
): Promise<void> {
  await db.execute(sql`DELETE FROM leases WHERE name = ${`replay:${houseId}:${holder}`}`);
}

/** Everything a stopping process holds goes back: its work is taken up by the others at once. */
export async function releaseAllLeases(db: Database, holder: string): Promise<void> {
  await db.execute(sql`DELETE FROM leases WHERE holder = ${holder}`);
}
