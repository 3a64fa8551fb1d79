/**
 * npm run bench:import [-- --lines 1000000]
 *
 * A generated counter export of --lines lines (long layout: timestamp,row,tier,eggs) imported end to end
 * through the API — multipart upload streamed to disk, the background import with its line checks, the
 * exactly-once bulk path and rollups — against `psql \copy` of the same rows into a plain table with the
 * same key, in the same run on a throwaway cluster. Prints lines/s, the total time, the API's peak RSS and
 * its RSS at 100,000 lines, and the ratio to COPY; the last line is one JSON object with every figure.
 * A benchmark, not a test: it asserts only that every line landed, and CI does not run it.
 */
import {
  chmodSync,
  createWriteStream,
  mkdtempSync,
  openAsBlob,
  readFileSync,
  rmSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { once } from 'node:events';
import { parseArgs } from 'node:util';
import { hash } from '@node-rs/argon2';
import { eq } from 'drizzle-orm';
import { insertHouseWithLayout, openDatabase, runMigrations, schema } from '@tierscope/db';
import { ensurePostgres, startCluster } from '../scripts/postgres';
import { copyBaselineSeconds } from './copy-baseline';
import { freePort, signInThroughApi, startApiProcess } from '../scripts/processes';
import { importForm, longMapping } from '../apps/api/src/testing/imports';

const { values } = parseArgs({ options: { lines: { type: 'string', default: '1000000' } } });
const LINES = Number(values.lines);
const ROWS = 12;
const TIERS = 4;

function memoryMb(pid: number, field: 'VmRSS' | 'VmHWM'): number {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  return Math.round(Number(new RegExp(`${field}:\\s+(\\d+)`).exec(status)?.[1] ?? 0) / 1024);
}

/** The i-th line: sections in turn, five minutes apart per round, from 1 August 2026. */
function lineAt(i: number) {
  const sections = ROWS * TIERS;
  const section = i % sections;
  const ts = new Date(Date.UTC(2026, 7, 1) + Math.floor(i / sections) * 300_000);
  return {
    row: Math.floor(section / TIERS) + 1,
    tier: (section % TIERS) + 1,
    ts: ts.toISOString(),
    eggs: (i * 7919) % 53,
  };
}

async function writeLines(path: string, line: (i: number) => string, header?: string) {
  const out = createWriteStream(path);
  if (header) out.write(`${header}\n`);
  for (let i = 0; i < LINES; i++) {
    if (!out.write(`${line(i)}\n`)) await once(out, 'drain');
  }
  out.end();
  await once(out, 'finish');
}

async function main(): Promise<void> {
  const bin = ensurePostgres();
  const dir = mkdtempSync(join(tmpdir(), 'tierscope-bench-import-'));
  chmodSync(dir, 0o755);
  const pgPort = await freePort();
  console.log(`[bench] ${LINES.toLocaleString()} lines; PostgreSQL on 127.0.0.1:${pgPort}`);
  const cluster = startCluster({
    dir: join(dir, 'pg'),
    port: pgPort,
    databases: ['bench_import', 'bench_copy'],
  });
  try {
    const database = openDatabase(cluster.url('bench_import'), { max: 2 });
    await runMigrations(database.db);
    const [farm] = await database.db.insert(schema.farms).values({ name: 'Bench' }).returning();
    if (!farm) throw new Error('no farm');
    const house = await insertHouseWithLayout(database.db, farm.id, {
      name: 'Bench house',
      rows: ROWS,
      tiers: TIERS,
      timezone: 'America/Chicago',
      lightsOn: '04:00',
      photoperiodHours: 16,
      shortfallThresholdPct: 10,
    });
    const [user] = await database.db
      .insert(schema.users)
      .values({ email: 'bench@bench.test', name: 'Bench', passwordHash: await hash('bench-pass') })
      .returning();
    if (!user) throw new Error('no user');
    await database.db
      .insert(schema.memberships)
      .values({ userId: user.id, farmId: farm.id, role: 'integrator' });
    const counters = await database.db
      .select({ id: schema.counters.id, row: schema.sections.row, tier: schema.sections.tier })
      .from(schema.counters)
      .innerJoin(schema.sections, eq(schema.sections.id, schema.counters.sectionId));
    const counterOf = new Map(counters.map((c) => [`${c.row}:${c.tier}`, c.id]));

    const exportFile = join(dir, 'export.csv');
    await writeLines(
      exportFile,
      (i) => {
        const l = lineAt(i);
        return `${l.ts},${l.row},${l.tier},${l.eggs}`;
      },
      'timestamp,row,tier,eggs',
    );

    const server = await startApiProcess({
      DATABASE_URL: cluster.url('bench_import'),
      JWT_SECRET: 'bench-secret-bench-secret-bench-secret-0123',
      DATA_DIR: join(dir, 'data'),
    });
    const pid = server.child.pid ?? 0;
    const login = await signInThroughApi(server.baseUrl, 'bench@bench.test', 'bench-pass');
    const auth = { authorization: `Bearer ${login.token}` };
    const rssBefore = memoryMb(pid, 'VmRSS');
    const peakBefore = memoryMb(pid, 'VmHWM');

    const started = performance.now();
    const form = importForm(await openAsBlob(exportFile, { type: 'text/csv' }), {
      ...longMapping('America/Chicago'),
      mode: 'interval',
    });
    const accepted = await fetch(`${server.baseUrl}/api/v1/houses/${house.id}/imports`, {
      method: 'POST',
      headers: auth,
      body: form,
    });
    if (accepted.status !== 202)
      throw new Error(`upload answered ${accepted.status}: ${await accepted.text()}`);
    const uploadedSeconds = (performance.now() - started) / 1000;
    const { id } = (await accepted.json()) as { id: number };
    let rssAt100k = 0;
    let status: { state: string; linesRead: number; readingsAdded: number; errorCount: number };
    for (;;) {
      const response = await fetch(`${server.baseUrl}/api/v1/imports/${id}`, { headers: auth });
      status = (await response.json()) as typeof status;
      if (rssAt100k === 0 && status.linesRead >= 100_000) rssAt100k = memoryMb(pid, 'VmRSS');
      if (!['queued', 'running'].includes(status.state)) break;
      await new Promise((resolve) => setTimeout(resolve, 100));
    }
    const seconds = (performance.now() - started) / 1000;
    const rssEnd = memoryMb(pid, 'VmRSS');
    const peak = memoryMb(pid, 'VmHWM');
    await server.stop();
    await database.close();
    if (status.state !== 'done' || status.readingsAdded !== LINES) {
      throw new Error(
        `import ended ${status.state} with ${status.readingsAdded} of ${LINES} readings`,
      );
    }
    console.log(
      `[bench] import through the API: ${seconds.toFixed(1)} s (upload ${uploadedSeconds.toFixed(1)} s), ${Math.round(LINES / seconds).toLocaleString()} lines/s`,
    );
    console.log(
      `[bench] API RSS: ${rssBefore} MB idle (peak so far ${peakBefore} MB, from starting up), ${rssAt100k} MB at 100k lines, ${rssEnd} MB at the end, peak ${peak} MB`,
    );

    // The baseline: the same rows as (farm, counter, ts, eggs) straight into a keyed table with psql \copy.
    const copyFile = join(dir, 'copy.csv');
    await writeLines(copyFile, (i) => {
      const l = lineAt(i);
      return `${farm.id},${counterOf.get(`${l.row}:${l.tier}`) ?? 0},${l.ts},${l.eggs}`;
    });
    const copySeconds = copyBaselineSeconds(bin, pgPort, 'bench_copy', copyFile);
    const copyRate = LINES / copySeconds;
    const rate = LINES / seconds;
    console.log(
      `[bench] psql \\copy baseline: ${copySeconds.toFixed(1)} s, ${Math.round(copyRate).toLocaleString()} lines/s`,
    );
    console.log(
      `[bench] import / COPY = ${(rate / copyRate).toFixed(2)}; targets: ≤ 15 s, RSS ≤ 300 MB, RSS flat from 100k lines`,
    );
    console.log(
      JSON.stringify({
        bench: 'import',
        lines: LINES,
        seconds: Number(seconds.toFixed(2)),
        upload_seconds: Number(uploadedSeconds.toFixed(2)),
        lines_per_s: Math.round(rate),
        copy_lines_per_s: Math.round(copyRate),
        vs_copy: Number((rate / copyRate).toFixed(3)),
        peak_rss_mb: peak,
        peak_before_import_mb: peakBefore,
        rss_100k_mb: rssAt100k,
        rss_end_mb: rssEnd,
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
