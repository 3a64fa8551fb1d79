import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import { withRetryOnConflict } from '../../platform/transactions';
import { rollupCtes } from './rollup-ctes';

/**
 * The bulk path for large loads (historical imports): COPY the rows into a temporary staging table, then
 * one `INSERT … SELECT … ON CONFLICT DO NOTHING` that also rolls up only the rows that were new — the same
 * exactly-once rule and the same rollups as live ingest, at COPY-like speed.
 * `csv` yields lines of `counter_id,ts,eggs,total` (total may be empty).
 */
export async function copyReadings(
  pool: pg.Pool,
  farmId: number,
  csv: Readable,
): Promise<{ added: number }> {
  if (!Number.isInteger(farmId)) throw new TypeError('farmId must be an integer');
  const client = await pool.connect();
  try {
    await client.query('BEGIN');
    await client.query(
      'CREATE TEMP TABLE staging_readings (counter_id int, ts timestamptz, eggs int, total int) ON COMMIT DROP',
    );
    await pipeline(csv, client.query(copyFrom('COPY staging_readings FROM STDIN (FORMAT csv)')));
    const result = await client.query<{ added: number }>(
      `WITH input AS (SELECT * FROM staging_readings ORDER BY counter_id, ts),
       added AS (
         INSERT INTO readings (farm_id, counter_id, ts, eggs, total)
         SELECT $1, counter_id, ts, eggs, total FROM input
         ON CONFLICT DO NOTHING
         RETURNING counter_id, ts, eggs
       ),
       ${rollupCtes('$1', 'added')}
       SELECT count(*)::int AS added FROM added`,
      [farmId],
    );
    await client.query('COMMIT');
    return { added: result.rows[0]?.added ?? 0 };
  } catch (error) {
    // Roll back so nothing of a failed load is kept; the caller sees the original error.
    await client.query('ROLLBACK').catch(() => undefined);
    throw error;
  } finally {
    client.release();
  }
}

/**
 * The bulk path over a stream of CSV lines, in chunks of `chunkRows` loaded by up to `parallel` connections
 * at once (each chunk its own transaction: a load that stops half-way is finished by loading it again, and
 * nothing is counted twice). Resolves with the rows that were new.
 */
export async function copyReadingsInChunks(
  pool: pg.Pool,
  farmId: number,
  lines: AsyncIterable<string>,
  options: { chunkRows?: number; parallel?: number; onChunk?: (added: number) => void } = {},
): Promise<{ added: number }> {
  const chunkRows = options.chunkRows ?? 100_000;
  const parallel = options.parallel ?? 2;
  const running = new Set<Promise<void>>();
  let added = 0;
  let chunk: string[] = [];
  const launch = (rows: string[]) => {
    const job: Promise<void> = withRetryOnConflict(() =>
      copyReadings(pool, farmId, Readable.from([rows.join('\n') + '\n'])),
    ).then((result) => {
      added += result.added;
      options.onChunk?.(result.added);
    });
    const tracked = job.finally(() => running.delete(tracked));
    running.add(tracked);
  };
  for await (const line of lines) {
    if (line === '') continue;
    chunk.push(line);
    if (chunk.length >= chunkRows) {
      launch(chunk);
      chunk = [];
      while (running.size >= parallel) await Promise.race(running);
    }
  }
  if (chunk.length > 0) launch(chunk);
  await Promise.all(running);
  return { added };
}
