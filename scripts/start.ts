/**
 * `npm start`: the whole product with its demo on this machine.
 * PostgreSQL (private cluster in .data/, loopback only) → migrations → demo seed (empty database only) →
 * web build → API serving it. Prints the URL and the demo sign-ins; Ctrl-C stops everything it started.
 * `npm start -- --reset` starts over with a fresh demo database; `npm start -- --processes 3` runs three API
 * processes behind a balancer on the same port.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { join } from 'node:path';
import { openDatabase, runMigrations } from '@tierscope/db';
import { sql } from 'drizzle-orm';
import {
  DEMO_LIGHTS_ON,
  DEMO_PASSWORD,
  DEMO_TIMEZONE,
  DEMO_USERS,
  demoFlocks,
  hasReadings,
  isEmpty,
  seedDemo,
} from '@tierscope/db/seed';
import { addDays, productionDayOf, productionDayStart } from '@tierscope/domain';
import { startMailCatcher, type MailCatcher } from '@tierscope/mail-catcher';
import { DEMO_FAULTS, DEMO_SIMULATOR_SEED, writeDemoHistory } from './demo-history';
import { prepareSimulatorFarms } from './demo-simulator';
import { recreateDatabase, startCluster } from './postgres';
import { startBalancer, type Balancer } from './balancer';
import { API_NODE_ARGS, freePort, waitForHealth } from './processes';

const ROOT = new URL('..', import.meta.url).pathname;
// A .env in the project is read when present (see .env.example); variables already set win over it.
if (existsSync(join(ROOT, '.env'))) process.loadEnvFile(join(ROOT, '.env'));
const DATA = join(ROOT, '.data');
const PG_PORT = Number(process.env['TIERSCOPE_PG_PORT'] ?? 54320);
const PORT = Number(process.env['PORT'] ?? 8080);
const SMTP_PORT = Number(process.env['TIERSCOPE_SMTP_PORT'] ?? 1025);
const MAILBOX_PORT = Number(process.env['TIERSCOPE_MAILBOX_PORT'] ?? 1080);
const DATABASE = 'tierscope';
const isReset = process.argv.includes('--reset');
/** `--processes N`: N API processes behind a balancer (default 1, no balancer). */
const PROCESSES = processesArg();

function processesArg(): number {
  const at = process.argv.indexOf('--processes');
  if (at === -1) return 1;
  const n = Number(process.argv[at + 1]);
  if (!Number.isInteger(n) || n < 1 || n > 16) {
    console.error('[start] --processes takes a whole number from 1 to 16');
    process.exit(2);
  }
  return n;
}

const children: ChildProcess[] = [];
let stopDatabase: (() => void) | null = null;
let mailCatcher: MailCatcher | null = null;
let balancer: Balancer | null = null;
let isStopping = false;

function log(line: string): void {
  console.log(`[start] ${line}`);
}

/** A secret made on first start and kept in .data/, so tokens survive restarts but never enter the repo. */
function jwtSecret(): string {
  const fromEnv = process.env['JWT_SECRET'];
  if (fromEnv) return fromEnv;
  const file = join(DATA, 'jwt-secret');
  if (!existsSync(file)) writeFileSync(file, randomBytes(48).toString('hex'), { mode: 0o600 });
  return readFileSync(file, 'utf8').trim();
}

function stopAll(code: number): void {
  if (isStopping) return;
  isStopping = true;
  log('stopping…');
  for (const child of children) child.kill('SIGTERM');
  void mailCatcher?.close();
  void balancer?.close();
  try {
    stopDatabase?.();
    log('database stopped');
  } catch (error) {
    console.error(error);
  }
  process.exit(code);
}

/** Restarts within this long of each other mean the API cannot stay up: then stop instead of looping. */
const RESTART_WINDOW_MS = 60_000;
const MAX_RESTARTS_IN_WINDOW = 5;

/**
 * Starts the API and starts it again if it crashes (the database, the simulator and the mail catcher keep
 * running; the simulator keeps its unsent batches and retries). Only a crash loop stops everything.
 */
function superviseApi(env: NodeJS.ProcessEnv): void {
  const restarts: number[] = [];
  const launch = () => {
    // One node process with tsx's loader (not npx → tsx → node), so stopping it stops the API itself.
    const api = spawn(process.execPath, API_NODE_ARGS, { cwd: ROOT, env, stdio: 'inherit' });
    children.push(api);
    api.on('exit', (code, signal) => {
      children.splice(children.indexOf(api), 1);
      if (isStopping) return;
      const now = Date.now();
      restarts.push(now);
      while (restarts.length > 0 && (restarts[0] ?? now) < now - RESTART_WINDOW_MS)
        restarts.shift();
      if (restarts.length > MAX_RESTARTS_IN_WINDOW) {
        console.error(
          `[start] the API exited ${restarts.length} times within a minute (last: ${code ?? signal}); stopping`,
        );
        stopAll(1);
        return;
      }
      console.error(`[start] the API exited (${code ?? signal}); starting it again in 1 s`);
      setTimeout(launch, 1000);
    });
  };
  launch();
}

function isPortFree(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const probe = createServer();
    probe.once('error', () => {
      resolve(false);
    });
    probe.listen(port, '127.0.0.1', () => {
      probe.close(() => {
        resolve(true);
      });
    });
  });
}

async function main(): Promise<void> {
  process.on('SIGINT', () => {
    stopAll(0);
  });
  process.on('SIGTERM', () => {
    stopAll(0);
  });
  mkdirSync(DATA, { recursive: true });

  log(`PostgreSQL on 127.0.0.1:${PG_PORT} (data in .data/pg)`);
  const cluster = startCluster({ dir: join(DATA, 'pg'), port: PG_PORT, databases: [DATABASE] });
  stopDatabase = () => {
    cluster.stop();
  };
  if (isReset) {
    log('--reset: recreating the database');
    recreateDatabase(PG_PORT, DATABASE);
  }
  const databaseUrl = process.env['DATABASE_URL'] ?? cluster.url(DATABASE);

  const database = openDatabase(databaseUrl, { max: 2 });
  await runMigrations(database.db);
  log('migrations applied');
  if (await isEmpty(database.db)) {
    await seedDemo(database.db);
    log('demo farms, houses and sign-ins seeded');
  } else {
    log('database already has data: demo seed skipped (npm start -- --reset to start over)');
  }
  const isHistoryMissing = !(await hasReadings(database.db));
  let backfillFrom: Date | null = null;
  if (isHistoryMissing) {
    // Older days as daily totals; the simulator backfills the last 14 days reading by reading, from the
    // lights-on of the production day 14 days ago (so that day is whole: not half history, half missing).
    const backfillDay = productionDayOf(
      new Date(Date.now() - 14 * 86_400_000),
      DEMO_TIMEZONE,
      DEMO_LIGHTS_ON,
    );
    backfillFrom = productionDayStart(backfillDay, DEMO_TIMEZONE, DEMO_LIGHTS_ON);
    const lastDay = addDays(backfillDay, -1);
    // The morning walks go on up to yesterday: the crew recorded them while the counts came by gateway.
    const yesterday = addDays(productionDayOf(new Date(), DEMO_TIMEZONE, DEMO_LIGHTS_ON), -1);
    const days = await writeDemoHistory(database.db, lastDay, new Date(), yesterday);
    log(
      `demo history: ${days} house-days of daily totals up to ${lastDay}, morning walks up to ${yesterday}`,
    );
  }
  const flocks = await demoFlocks(database.db);
  await database.close();

  if (!process.argv.includes('--skip-build')) {
    log('building the web app…');
    const build = spawnSync('npx', ['ng', 'build', 'web'], {
      cwd: ROOT,
      stdio: ['ignore', 'inherit', 'inherit'],
    });
    if (build.status !== 0) throw new Error('the web build failed');
  }

  if (!(await isPortFree(PORT))) {
    throw new Error(
      `port ${PORT} is already in use: stop what listens there, or run PORT=8081 npm start`,
    );
  }
  // The local SMTP catcher stands in for the mail service; the admin's Mailbox page shows what it caught.
  mailCatcher = await startMailCatcher({
    smtpPort: (await isPortFree(SMTP_PORT)) ? SMTP_PORT : 0,
    httpPort: (await isPortFree(MAILBOX_PORT)) ? MAILBOX_PORT : 0,
  });
  log(`mail catcher: SMTP on 127.0.0.1:${mailCatcher.smtpPort}, list at ${mailCatcher.httpUrl}`);
  const env = {
    ...process.env,
    SMTP_URL: process.env['SMTP_URL'] ?? `smtp://127.0.0.1:${mailCatcher.smtpPort}`,
    ...(process.env['SMTP_URL'] ? {} : { MAIL_CATCHER_URL: mailCatcher.httpUrl }),
    EXCEPTION_MAIL_SECONDS: process.env['EXCEPTION_MAIL_SECONDS'] ?? '60',
    DATA_DIR: process.env['DATA_DIR'] ?? DATA,
    PUBLIC_URL: process.env['PUBLIC_URL'] ?? `http://127.0.0.1:${PORT}`,
    DATABASE_URL: databaseUrl,
    PORT: String(PORT),
    HOST: process.env['HOST'] ?? '127.0.0.1',
    JWT_SECRET: jwtSecret(),
    WEB_DIST: join(ROOT, 'dist/web/browser'),
  };
  const url = `http://127.0.0.1:${PORT}`;
  if (PROCESSES === 1) superviseApi(env);
  else {
    // Several API processes on one database behind a balancer on the public port (ADR 0005).
    const targets: string[] = [];
    for (let i = 0; i < PROCESSES; i++) {
      const port = await freePort();
      targets.push(`http://127.0.0.1:${port}`);
      superviseApi({ ...env, PORT: String(port) });
    }
    await Promise.all(targets.map((target) => waitForHealth(target, 60_000)));
    balancer = await startBalancer({ port: PORT, targets });
    log(`${PROCESSES} API processes (${targets.join(', ')}) behind the balancer on ${url}`);
  }
  await waitForHealth(url, 60_000);

  const farmFiles = await prepareSimulatorFarms({ apiUrl: url, dataDir: DATA, flocks });
  const simulatorArgs = [
    '--import',
    'tsx',
    'simulator/src/main.ts',
    ...farmFiles.flatMap((file) => ['--farm-file', file]),
    '--seed',
    String(DEMO_SIMULATOR_SEED),
    '--interval',
    '1',
    ...(backfillFrom
      ? ['--backfill-from', backfillFrom.toISOString(), '--backfill-interval', '15']
      : []),
    // The demo's planted faults (DESIGN.md).
    ...DEMO_FAULTS.flatMap((fault) => ['--fault', fault]),
  ];
  const simulator = spawn(process.execPath, simulatorArgs, {
    cwd: ROOT,
    env: process.env,
    stdio: 'inherit',
  });
  children.push(simulator);
  simulator.on('exit', (code) => {
    if (!isStopping)
      console.error(`[start] the simulator exited (${code}); the app keeps running without it`);
  });
  log(backfillFrom ? 'simulator: backfilling 14 days of history, then live' : 'simulator: live');
  if (backfillFrom) await waitForJudgedHistory(databaseUrl);

  console.log('');
  console.log(`  Tierscope is running at ${url}`);
  console.log('');
  console.log(`  Demo sign-ins (password for all: ${DEMO_PASSWORD}):`);
  for (const user of DEMO_USERS) console.log(`    ${user.role.padEnd(11)} ${user.email}`);
  console.log('');
  console.log('  Mail goes to the local catcher: sign in as admin and open Mailbox to read it.');
  console.log('  Ctrl-C stops the app and its database.');
  console.log('');
}

/** How long `npm start` waits for the demo's history to be judged before it gives the URL anyway. */
const HISTORY_WAIT_MS = 10 * 60_000;

/**
 * Waits until the simulator's backfill has reached the present in every house and no process is judging past
 * days any more, so the first page opened shows the demo as it is meant to look. Says how far it is.
 */
async function waitForJudgedHistory(databaseUrl: string): Promise<void> {
  const database = openDatabase(databaseUrl, { max: 1 });
  const startedAt = Date.now();
  let lastSaid = '';
  let lastSaidAt = 0;
  let quietPolls = 0;
  try {
    for (;;) {
      const result = await database.db.execute<{ reached: string | null; judging: number }>(sql`
        SELECT (SELECT min(last_ts) FROM (
                  SELECT (SELECT max(r.ts) FROM readings r JOIN counters c ON c.id = r.counter_id
                          WHERE c.house_id = h.id AND c.kind = 'collector') AS last_ts
                  FROM houses h) per_house) AS reached,
               (SELECT count(DISTINCT split_part(name, ':', 2))::int FROM leases
                WHERE name LIKE 'replay:%' AND until > now()) AS judging`);
      const row = result.rows[0];
      const reached = row?.reached ? new Date(row.reached) : null;
      const isCaughtUp = reached !== null && Date.now() - reached.getTime() < 30 * 60_000;
      // Twice in a row: a replay just scheduled writes its mark a moment after its readings land.
      quietPolls = isCaughtUp && row?.judging === 0 ? quietPolls + 1 : 0;
      if (quietPolls >= 2) {
        log('history judged: every house is live');
        return;
      }
      const said = isCaughtUp
        ? `judging history: ${row?.judging} ${row?.judging === 1 ? 'house' : 'houses'} still being checked…`
        : `judging history: readings sent up to ${reached ? reached.toISOString().slice(0, 16).replace('T', ' ') + ' UTC' : 'the first day'}…`;
      if (said !== lastSaid && Date.now() - lastSaidAt > 10_000) {
        log(said);
        lastSaid = said;
        lastSaidAt = Date.now();
      }
      if (Date.now() - startedAt > HISTORY_WAIT_MS) {
        log('history is still being judged: open the app now, the house pages say when it is done');
        return;
      }
      await new Promise((resolve) => setTimeout(resolve, 2000));
    }
  } finally {
    await database.close();
  }
}

void main().catch((error: unknown) => {
  console.error(`[start] ${error instanceof Error ? error.message : String(error)}`);
  stopAll(1);
});
