/**
 * npm run bench:ingest [-- --rows 1000000 --clients 4 --batch 10000 --processes 2]
 *
 * Loads the same generated readings three ways, each into a fresh database with the same keys, in one run:
 *   (a) the HTTP ingest API (a separate API process, several concurrent clients, 10,000-reading batches;
 *       with --processes N also N API processes on one database, the clients spread over them),
 *   (b) the bulk path the historical importer uses (COPY into staging, then INSERT … ON CONFLICT + rollups),
 *   (c) psql \copy into a plain table with the same primary key — the baseline.
 * Prints rows/s, the ratios a/c and b/c and the API's peak RSS; the last line is one JSON object.
 * A benchmark, not a test: it asserts nothing and CI does not run it.
 */
import {
  createReadStream,
  chmodSync,
  mkdtempSync,
  readFileSync,
  rmSync,
  writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import { hash } from '@node-rs/argon2';
import { insertHouseWithLayout, openDatabase, runMigrations, schema } from '@tierscope/db';
import { createInterface } from 'node:readline';
import { copyReadingsInChunks } from '../apps/api/src/features/ingest/bulk-ingest.repository';
import { ensurePostgres, startCluster } from '../scripts/postgres';
import { copyBaselineSeconds } from './copy-baseline';
import { freePort, makeGatewayKey, signInThroughApi, startApiProcess } from '../scripts/processes';

const { values } = parseArgs({
  options: {
    rows: { type: 'string', default: '1000000' },
    clients: { type: 'string', default: '4' },
    batch: { type: 'string', default: '10000' },
    processes: { type: 'string', default: '1' },
  },
});
const ROWS = Number(values.rows);
const CLIENTS = Number(values.clients);
const BATCH = Number(values.batch);
/** With N > 1, (a) runs twice in the same run: one API process, then N on the same database kind. */
const PROCESSES = Number(values.processes);
const HOUSES = 10;

/** A farm of 10 houses (6 rows × 3 tiers and a collector each): 190 counters. */
async function prepareFarm(url: string) {
  const database = openDatabase(url, { max: 4 });
  await runMigrations(database.db);
  const [farm] = await database.db.insert(schema.farms).values({ name: 'Bench Farm' }).returning();
  if (!farm) throw new Error('no farm');
  for (let h = 1; h <= HOUSES; h++) {
    await insertHouseWithLayout(database.db, farm.id, {
      name: `House ${h}`,
      rows: 6,
      tiers: 3,
      timezone: 'America/Chicago',
      lightsOn: '04:00',
      photoperiodHours: 16,
      shortfallThresholdPct: 10,
    });
  }
  const counters = await database.db
    .select({ id: schema.counters.id, externalId: schema.counters.externalId })
    .from(schema.counters);
  return { database, farmId: farm.id, counters: counters.sort((a, b) => a.id - b.id) };
}

/** The i-th generated reading: counters in turn, one minute apart per round, from 2026-10-01. */
function reading(i: number, counterCount: number) {
  const round = Math.floor(i / counterCount);
  return {
    counterIndex: i % counterCount,
    ts: new Date(Date.UTC(2026, 9, 1) + round * 60_000),
    eggs: (i * 7919) % 37,
  };
}

function counterAt<T>(list: T[], index: number): T {
  const item = list[index];
  if (item === undefined) throw new Error(`no counter ${index}`);
  return item;
}

function peakRssMb(pid: number): number {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = Number(/VmHWM:\s+(\d+)/.exec(status)?.[1] ?? 0);
  return Math.round(kb / 1024);
}

/**
 * Posts every generated reading through `processes` API processes on one database (the clients take the
 * processes in turn) and returns the time taken and the largest peak RSS of them.
 */
async function runApi(url: string, processes: number) {
  const farm = await prepareFarm(url);
  const counterCount = farm.counters.length;
  const [user] = await farm.database.db
    .insert(schema.users)
    .values({
      email: 'bench@bench.test',
      name: 'Bench',
      passwordHash: await hash('bench-password'),
    })
    .returning();
  if (!user) throw new Error('no user');
  await farm.database.db
    .insert(schema.memberships)
    .values({ userId: user.id, farmId: farm.farmId, role: 'integrator' });
  const servers = await Promise.all(
    Array.from({ length: processes }, () =>
      startApiProcess({
        DATABASE_URL: url,
        JWT_SECRET: 'bench-secret-bench-secret-bench-secret-0123',
      }),
    ),
  );
  const first = servers[0];
  if (!first) throw new Error('no API process');
  const login = await signInThroughApi(first.baseUrl, 'bench@bench.test', 'bench-password');
  const key = await makeGatewayKey(first.baseUrl, login.token, farm.farmId, 'bench');
  const batches = Math.ceil(ROWS / BATCH);
  let next = 0;
  let accepted = 0;
  const started = performance.now();
  await Promise.all(
    Array.from({ length: CLIENTS }, async (_, client) => {
      const apiUrl = (servers[client % servers.length] ?? first).baseUrl;
      for (;;) {
        const b = next++;
        if (b >= batches) return;
        const readings = [];
        for (let i = b * BATCH; i < Math.min(ROWS, (b + 1) * BATCH); i++) {
          const r = reading(i, counterCount);
          readings.push({
            counter: counterAt(farm.counters, r.counterIndex).externalId,
            ts: r.ts.toISOString(),
            eggs: r.eggs,
          });
        }
        const response = await fetch(`${apiUrl}/api/v1/ingest/readings`, {
          method: 'POST',
          headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
          body: JSON.stringify({ readings }),
        });
        if (!response.ok)
          throw new Error(`ingest answered ${response.status}: ${await response.text()}`);
        accepted += ((await response.json()) as { accepted: number }).accepted;
      }
    }),
  );
  const seconds = (performance.now() - started) / 1000;
  const peak = Math.max(...servers.map((s) => (s.child.pid ? peakRssMb(s.child.pid) : 0)));
  await Promise.all(servers.map((s) => s.stop()));
  await farm.database.close();
  if (accepted !== ROWS) throw new Error(`API accepted ${accepted} of ${ROWS}`);
  console.log(
    `[bench] (a) API, ${processes} process${processes > 1 ? 'es' : ''}, ${CLIENTS} clients × ${BATCH}/batch: ` +
      `${seconds.toFixed(1)} s, ${Math.round(ROWS / seconds).toLocaleString()} rows/s, peak RSS ${peak} MB`,
  );
  return { farm, seconds, peakRssMb: peak };
}

async function main(): Promise<void> {
  const bin = ensurePostgres();
  const dir = mkdtempSync(join(tmpdir(), 'tierscope-bench-'));
  chmodSync(dir, 0o755);
  const pgPort = await freePort();
  console.log(
    `[bench] ${ROWS.toLocaleString()} readings; PostgreSQL on 127.0.0.1:${pgPort} (default durability)`,
  );
  const cluster = startCluster({
    dir: join(dir, 'pg'),
    port: pgPort,
    databases: ['bench_api', 'bench_api_n', 'bench_bulk', 'bench_copy'],
  });
  try {
    // (a) the API: one process, then (with --processes N) N processes on one database
    const single = await runApi(cluster.url('bench_api'), 1);
    const api = single.farm;
    const counterCount = api.counters.length;
    const apiSeconds = single.seconds;
    const apiRss = single.peakRssMb;
    const multi = PROCESSES > 1 ? await runApi(cluster.url('bench_api_n'), PROCESSES) : null;

    // The same rows as CSV for (b) and (c): counter ids are equal in all three databases (same creation order).
    const csvFile = join(dir, 'readings.csv');
    const copyFile = join(dir, 'readings-copy.csv');
    const lines: string[] = [];
    const copyLines: string[] = [];
    for (let i = 0; i < ROWS; i++) {
      const r = reading(i, counterCount);
      const id = counterAt(api.counters, r.counterIndex).id;
      lines.push(`${id},${r.ts.toISOString()},${r.eggs},`);
      copyLines.push(`${api.farmId},${id},${r.ts.toISOString()},${r.eggs}`);
    }
    writeFileSync(csvFile, lines.join('\n') + '\n');
    writeFileSync(copyFile, copyLines.join('\n') + '\n');
    lines.length = 0;
    copyLines.length = 0;

    // (b) the bulk path
    const bulk = await prepareFarm(cluster.url('bench_bulk'));
    await bulk.database.pool.query(
      `SELECT ensure_readings_partition(m::date) FROM generate_series('2026-10-01'::date, '2027-01-01', '1 month') m`,
    );
    const bulkStart = performance.now();
    const { added } = await copyReadingsInChunks(
      bulk.database.pool,
      bulk.farmId,
      createInterface({ input: createReadStream(csvFile), crlfDelay: Infinity }),
    );
    const bulkSeconds = (performance.now() - bulkStart) / 1000;
    await bulk.database.close();
    if (added !== ROWS) throw new Error(`bulk path added ${added} of ${ROWS}`);
    console.log(
      `[bench] (b) bulk path (COPY → staging → INSERT … ON CONFLICT + rollups, 100k-row chunks on 2 connections): ${bulkSeconds.toFixed(1)} s, ${Math.round(ROWS / bulkSeconds).toLocaleString()} rows/s`,
    );

    // (c) the baseline: psql \copy into a plain table with the same key
    const copySeconds = copyBaselineSeconds(bin, pgPort, 'bench_copy', copyFile);
    console.log(
      `[bench] (c) psql \\copy baseline: ${copySeconds.toFixed(1)} s, ${Math.round(ROWS / copySeconds).toLocaleString()} rows/s`,
    );

    const apiRate = ROWS / apiSeconds;
    const bulkRate = ROWS / bulkSeconds;
    const copyRate = ROWS / copySeconds;
    console.log(
      `[bench] API / COPY = ${(apiRate / copyRate).toFixed(2)} (target ≥ 0.35); bulk / COPY = ${(bulkRate / copyRate).toFixed(2)} (target ≥ 0.5)`,
    );
    const multiRate = multi ? ROWS / multi.seconds : null;
    if (multi && multiRate)
      console.log(
        `[bench] API with ${PROCESSES} processes / 1 process = ${(multiRate / apiRate).toFixed(2)}; / COPY = ${(multiRate / copyRate).toFixed(2)}`,
      );
    console.log(
      JSON.stringify({
        bench: 'ingest',
        rows: ROWS,
        clients: CLIENTS,
        batch: BATCH,
        api_rows_per_s: Math.round(apiRate),
        bulk_rows_per_s: Math.round(bulkRate),
        copy_rows_per_s: Math.round(copyRate),
        api_vs_copy: Number((apiRate / copyRate).toFixed(3)),
        bulk_vs_copy: Number((bulkRate / copyRate).toFixed(3)),
        api_peak_rss_mb: apiRss,
        ...(multi && multiRate
          ? {
              processes: PROCESSES,
              api_n_rows_per_s: Math.round(multiRate),
              api_n_vs_1: Number((multiRate / apiRate).toFixed(3)),
            }
          : {}),
      }),
    );
  } finally {
    cluster.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}

void main().catch((error: unknown) => {
  console.error(error);
  process.exit(1);
});
