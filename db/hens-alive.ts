import { sql, type SQL } from 'drizzle-orm';

/**
 * Hens alive in a flock on a day, as every query counts them: hens housed less the dead and culled of the
 * morning walks before that day, never below zero (the same rule as libs/domain `hensAliveByDay`).
 * `flockId` and `hensHoused` are the flock's columns in the calling query, `day` a date expression.
 */
export function hensAliveSql(flockId: SQL, hensHoused: SQL, day: SQL): SQL {
  return sql`greatest(0, ${hensHoused} - coalesce((SELECT sum(m.dead + m.culled) FROM mortality m
    WHERE m.flock_id = ${flockId} AND m.date < ${day}), 0))::int`;
}
