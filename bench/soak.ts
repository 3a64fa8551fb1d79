/**
 * npm run soak [-- --days 10 --speed 1440]
 *
 * The demo farms on a throwaway cluster, the real API process, the simulator posting `--days` simulated
 * days at `--speed`× (1440: a day a minute; the hardening issue asks for 60×, which takes 4 h for 10 days),
 * and beside it the robustness corpus (malformed paths, queries, bodies, encodings, socket frames) sent in
 * a loop. Prints the API's resident memory at the start, every minute and at the end, the number of 5xx
 * answers, and checks that every reading the simulator sent is stored once and the rollups equal the raw
 * readings. The last line is one JSON object. Not a test; CI does not run it.
 */
import { spawn } from 'node:child_process';
import { chmodSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import { openDatabase, runMigrations } from '@tierscope/db';
import { demoFlocks, seedDemo } from '@tierscope/db/seed';
import { WebSocket } from 'ws';
import { prepareSimulatorFarms } from '../scripts/demo-simulator';
import { startCluster } from '../scripts/postgres';
import { freePort, signInThroughApi, startApiProcess } from '../scripts/processes';
import {
  BAD_PATH_VALUES,
  BAD_QUERY_VALUES,
  BAD_RAW_BODIES,
  randomBodies,
} from '../tests/robustness/corpus';

const ROOT = new URL('..', import.meta.url).pathname;

function rssMb(pid: number): number {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = Number(/VmRSS:\s+(\d+)/.exec(status)?.[1] ?? 0);
  return Math.round(kb / 1024);
}

async function main(): Promise<void> {
  const { values } = parseArgs({
    options: {
      days: { type: 'string', default: '10' },
      speed: { type: 'string', default: '1440' },
    },
  });
  const days = Number(values.days);
  const speed = Number(values.speed);
  const dir = mkdtempSync(join(tmpdir(), 'tierscope-soak-'));
  chmodSync(dir, 0o755);
  const cluster = startCluster({
    dir: join(dir, 'pg'),
    port: await freePort(),
    databases: ['soak'],
  });
  const url = cluster.url('soak');
  try {
    const database = openDatabase(url, { max: 2 });
    await runMigrations(database.db);
    await seedDemo(database.db);
    const flocks = await demoFlocks(database.db);
    const api = await startApiProcess(
      { DATABASE_URL: url, JWT_SECRET: 'soak-secret-soak-secret-soak-secret-0123', DATA_DIR: dir },
      { stdio: ['ignore', 'ignore', 'inherit'] },
    );
    const pid = api.child.pid ?? 0;
    const farmFiles = await prepareSimulatorFarms({ apiUrl: api.baseUrl, dataDir: dir, flocks });
    const startRss = rssMb(pid);
    console.log(`[soak] API RSS at start ${startRss} MB; ${days} simulated days at ${speed}×`);

    const summaryFile = join(dir, 'summary.json');
    // Live from `days` ago (the simulator starts a day before --start when it runs faster than real time).
    const start = new Date(Date.now() - (days - 1) * 86_400_000).toISOString();
    const simulator = spawn(
      process.execPath,
      [
        '--import',
        'tsx',
        'simulator/src/main.ts',
        ...farmFiles.flatMap((f) => ['--farm-file', f]),
        '--seed',
        '7',
        '--interval',
        '5',
        '--speed',
        String(speed),
        '--start',
        start,
        '--duration',
        String(days * 24),
        '--summary',
        summaryFile,
      ],
      { cwd: ROOT, stdio: ['ignore', 'ignore', 'inherit'] },
    );
    const simulatorDone = new Promise<void>((resolve) => {
      simulator.once('exit', () => {
        resolve();
      });
    });

    // The corpus, in a loop beside the simulator, until it ends.
    const { token } = await signInThroughApi(
      api.baseUrl,
      'admin@bramblewood.test',
      'tierscope-demo',
    );
    const statuses = new Map<number, number>();
    let isRunning = true;
    let requests = 0;
    const note = (status: number) => {
      requests += 1;
      statuses.set(status, (statuses.get(status) ?? 0) + 1);
    };
    const routes = [
      '/api/v1/houses/{id}/map',
      '/api/v1/farms/{id}',
      '/api/v1/work-orders/{id}',
      '/api/v1/flocks/{id}/production',
    ];
    const corpus = async () => {
      const bodies = randomBodies(1, 50);
      for (let round = 0; isRunning; round++) {
        for (const route of routes) {
          for (const bad of BAD_PATH_VALUES) {
            const r = await fetch(`${api.baseUrl}${route.replace('{id}', bad)}`, {
              headers: { authorization: `Bearer ${token}` },
            });
            note(r.status);
          }
        }
        for (const bad of BAD_QUERY_VALUES) {
          const r = await fetch(`${api.baseUrl}/api/v1/exceptions?from=${bad}&farmId=${bad}`, {
            headers: { authorization: `Bearer ${token}` },
          });
          note(r.status);
        }
        for (const body of [
          ...BAD_RAW_BODIES.map((b) => b.text),
          ...bodies.map((b) => JSON.stringify(b)),
        ]) {
          const r = await fetch(`${api.baseUrl}/api/v1/work-orders`, {
            method: 'POST',
            headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
            body,
          });
          note(r.status);
        }
        // A socket that sends bad frames each round: it is closed, the API keeps going.
        await new Promise<void>((resolve) => {
          const socket = new WebSocket(`${api.baseUrl.replace('http', 'ws')}/api/v1/live`);
          socket.on('open', () => {
            socket.send(Buffer.from([0xff, 0xfe]), { binary: false });
          });
          socket.on('error', () => undefined);
          socket.on('close', () => {
            resolve();
          });
        });
        if (round % 20 === 0) await new Promise((r) => setTimeout(r, 100));
      }
    };
    const corpusDone = corpus();
    const samples: number[] = [startRss];
    const sampler = setInterval(() => {
      const rss = rssMb(pid);
      samples.push(rss);
      console.log(`[soak] API RSS ${rss} MB; ${requests} corpus requests so far`);
    }, 60_000);
    await simulatorDone;
    isRunning = false;
    await corpusDone;
    clearInterval(sampler);
    const endRss = rssMb(pid);

    const sent = JSON.parse(readFileSync(summaryFile, 'utf8')) as {
      farms: {
        readings: number;
        accepted: number;
        duplicates: number;
        backlog: { batches: number; readings: number };
      }[];
    };
    const readingsSent = sent.farms.reduce((n, f) => n + f.readings, 0);
    const backlog = sent.farms.reduce((n, f) => n + f.backlog.readings, 0);
    const stored = await database.pool.query<{ readings: string; eggs: string }>(
      'select count(*) as readings, coalesce(sum(eggs), 0) as eggs from readings',
    );
    const rollups = await database.pool.query<{
      sections: string;
      collectors: string;
      belts: string;
      collector_raw: string;
    }>(
      `select (select coalesce(sum(eggs), 0) from section_day_rollups) as sections,
              (select coalesce(sum(eggs), 0) from collector_day_rollups) as collectors,
              (select coalesce(sum(r.eggs), 0) from readings r join counters c on c.id = r.counter_id where c.kind = 'belt') as belts,
              (select coalesce(sum(r.eggs), 0) from readings r join counters c on c.id = r.counter_id where c.kind = 'collector') as collector_raw`,
    );
    const r = rollups.rows[0];
    const storedReadings = Number(stored.rows[0]?.readings ?? 0);
    if (!r) throw new Error('no rollup sums');
    const serverErrors = [...statuses].filter(([s]) => s >= 500).reduce((n, [, c]) => n + c, 0);
    const isEveryReadingOnce = storedReadings === readingsSent && backlog === 0;
    const isRollupsEqual = r.sections === r.belts && r.collectors === r.collector_raw;
    console.log(
      `[soak] simulator: ${readingsSent} readings sent, ${backlog} left unsent; stored ${storedReadings}`,
    );
    console.log(
      `[soak] rollups: sections ${r.sections} = belts ${r.belts}: ${r.sections === r.belts}; collectors ${r.collectors} = raw ${r.collector_raw}: ${r.collectors === r.collector_raw}`,
    );
    console.log(
      `[soak] corpus: ${requests} requests, answers ${JSON.stringify(Object.fromEntries(statuses))}`,
    );
    console.log(
      `[soak] API RSS start ${startRss} MB, end ${endRss} MB, max ${Math.max(...samples, endRss)} MB; alive: ${api.child.exitCode === null}`,
    );
    console.log(
      JSON.stringify({
        bench: 'soak',
        simulated_days: days,
        speed,
        readings_sent: readingsSent,
        readings_stored: storedReadings,
        every_reading_once: isEveryReadingOnce,
        rollups_equal_raw: isRollupsEqual,
        corpus_requests: requests,
        server_errors: serverErrors,
        rss_start_mb: startRss,
        rss_end_mb: endRss,
        rss_max_mb: Math.max(...samples, endRss),
      }),
    );
    await api.stop();
    await database.close();
    if (serverErrors > 0 || !isEveryReadingOnce || !isRollupsEqual) process.exitCode = 1;
  } finally {
    cluster.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}

void main().catch((error: unknown) => {
  console.error(error);
  process.exit(1);
});
