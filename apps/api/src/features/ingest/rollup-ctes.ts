/**
 * The rollup part of every write of readings, as SQL common table expressions over `source` (rows of
 * counter_id, ts, eggs): per counter per hour, per section per production day and per collector per
 * production day. A production day starts at the house's lights-on in its own time zone, so
 * `AT TIME ZONE` handles daylight-saving days. `farm` is a SQL expression: a bind parameter or an integer.
 * Live ingest and the bulk path share this text, so their rollups cannot drift apart. Each insert runs in
 * key order, so concurrent writers take row locks in the same order and cannot deadlock on them.
 */
export function rollupCtes(farm: string, source: string): string {
  return `
  hourly AS (
    INSERT INTO counter_hour_rollups AS r (farm_id, counter_id, hour, eggs)
    SELECT ${farm}, counter_id, date_trunc('hour', ts), sum(eggs)::int FROM ${source}
    GROUP BY counter_id, date_trunc('hour', ts) ORDER BY 2, 3
    ON CONFLICT (farm_id, counter_id, hour) DO UPDATE SET eggs = r.eggs + excluded.eggs
  ),
  located AS (
    SELECT c.kind, c.section_id, c.house_id, s.eggs,
           ((s.ts AT TIME ZONE h.timezone) - h.lights_on::interval)::date AS day
    FROM ${source} s JOIN counters c ON c.id = s.counter_id JOIN houses h ON h.id = c.house_id
  ),
  by_section AS (
    INSERT INTO section_day_rollups AS r (farm_id, section_id, day, eggs)
    SELECT ${farm}, section_id, day, sum(eggs)::int FROM located
    WHERE kind = 'belt' AND section_id IS NOT NULL GROUP BY section_id, day ORDER BY 2, 3
    ON CONFLICT (farm_id, section_id, day) DO UPDATE SET eggs = r.eggs + excluded.eggs
  ),
  by_collector AS (
    INSERT INTO collector_day_rollups AS r (farm_id, house_id, day, eggs)
    SELECT ${farm}, house_id, day, sum(eggs)::int FROM located
    WHERE kind = 'collector' GROUP BY house_id, day ORDER BY 2, 3
    ON CONFLICT (farm_id, house_id, day) DO UPDATE SET eggs = r.eggs + excluded.eggs
  )`;
}
