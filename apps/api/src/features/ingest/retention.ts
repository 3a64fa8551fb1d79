import type { Database } from '@tierscope/db';
import { dropReadingPartitionsBefore, ensureReadingPartitions } from './ingest.repository';

/** First day (UTC) of the month `offset` months from `now`, as YYYY-MM-DD. */
export function monthStart(now: Date, offset: number): string {
  return new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() + offset, 1))
    .toISOString()
    .slice(0, 10);
}

/**
 * The daily housekeeping of raw readings: partitions for the coming months are made ahead of time, and
 * whole months older than the retention are dropped. Rollups are never touched, so maps and reports of
 * old days stay.
 */
export async function maintainReadingPartitions(
  db: Database,
  retentionMonths: number,
  now = new Date(),
): Promise<{ dropped: string[] }> {
  await ensureReadingPartitions(
    db,
    [0, 1, 2, 3].map((m) => monthStart(now, m)),
  );
  const dropped = await dropReadingPartitionsBefore(db, monthStart(now, -retentionMonths));
  return { dropped };
}
