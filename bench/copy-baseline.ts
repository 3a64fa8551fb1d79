import { spawnSync } from 'node:child_process';
import { join } from 'node:path';

/**
 * The benchmarks' baseline: `psql \copy` of a CSV of (farm_id, counter_id, ts, eggs) into a plain table with
 * the same primary key as readings, in database `database` of the cluster on `port`. Answers the seconds.
 */
export function copyBaselineSeconds(
  bin: string,
  port: number,
  database: string,
  csvFile: string,
): number {
  const psql = (command: string) => {
    const result = spawnSync(
      join(bin, 'psql'),
      [
        '-h',
        '127.0.0.1',
        '-p',
        String(port),
        '-U',
        'postgres',
        '-d',
        database,
        '-v',
        'ON_ERROR_STOP=1',
        '-qc',
        command,
      ],
      { encoding: 'utf8' },
    );
    if (result.status !== 0) throw new Error(result.stderr);
  };
  psql(
    'CREATE TABLE readings_copy (farm_id int NOT NULL, counter_id int NOT NULL, ts timestamptz NOT NULL, eggs int NOT NULL, PRIMARY KEY (farm_id, counter_id, ts))',
  );
  const started = performance.now();
  psql(`\\copy readings_copy FROM '${csvFile}' WITH (FORMAT csv)`);
  return (performance.now() - started) / 1000;
}
