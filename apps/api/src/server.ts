import { existsSync } from 'node:fs';
import { openDatabase, runMigrations } from '@tierscope/db';
import { createApp, createRuntime } from './app';
import { allHouseIds } from './features/evaluation/evaluation.repository';
import { attachLive } from './realtime/live';
import { maintainReadingPartitions } from './features/ingest/retention';
import { loadConfig } from './platform/config';
import { createClusterEventBus } from './platform/cluster-events';
import { claimLease } from './platform/leases';
import { releaseAllLeases } from './platform/cluster.repository';

/** How often the cluster evaluates every house (silent counters) and looks for abandoned imports. */
const SWEEP_MS = 60_000;
/** The longest a stopping process waits for its work in hand. */
const SHUTDOWN_GRACE_MS = 20_000;

/** Starts the API on its own (npm run api); `npm start` starts it through scripts/start.ts instead. */
async function main(): Promise<void> {
  // A .env beside the project is read when present; variables already set win over it.
  if (existsSync('.env')) process.loadEnvFile('.env');
  const config = loadConfig(process.env);
  const database = openDatabase(config.databaseUrl);
  await runMigrations(database.db);
  const log = (message: string, error?: unknown) => {
    console.error(`[api] ${message}`, error ?? '');
  };
  // Events reach every API process on this database (LISTEN/NOTIFY); work is shared out by leases.
  const events = createClusterEventBus(database.db, config.databaseUrl, log);
  await events.ready();
  const holder = events.processId;
  const housekeeping = async () => {
    // Once a day across the cluster, whichever process asks first.
    if (!(await claimLease(database.db, 'housekeeping', holder, 23 * 3_600_000))) return;
    const { dropped } = await maintainReadingPartitions(
      database.db,
      config.readingsRetentionMonths,
    );
    if (dropped.length > 0) console.log(`[api] retention: dropped ${dropped.join(', ')}`);
  };
  await housekeeping();
  const housekeepingTimer = setInterval(() => {
    housekeeping().catch((error: unknown) => {
      console.error('[api] partition housekeeping failed', error);
    });
  }, 3_600_000);
  housekeepingTimer.unref();
  const runtime = createRuntime({ db: database.db, config, log, events, holder });
  let isStopping = false;
  const app = createApp({
    db: database.db,
    config,
    runtime,
    log,
    holder,
    isReady: () => !isStopping,
  });
  runtime.notifier.start();
  const resumed = await runtime.imports.resumeInterrupted();
  if (resumed > 0) console.log(`[api] imports: ${resumed} interrupted import(s) queued again`);
  if (config.mailCatcherUrl)
    console.log(`[api] mail goes to the local catcher (${config.smtpUrl ?? 'no SMTP_URL'})`);
  const server = app.listen(config.port, config.host, () => {
    console.log(`[api] listening on http://${config.host}:${config.port} (process ${holder})`);
  });
  const live = attachLive(server, { db: database.db, ...runtime, log });
  // Silent counters need time to pass, not data: every house is evaluated each minute — by one process
  // of the cluster (the one that takes the minute's lease), which also takes over imports left by a
  // process that died.
  const sweep = async () => {
    if (!(await claimLease(database.db, 'sweep', holder, SWEEP_MS - 5_000))) return;
    await runtime.imports.resumeInterrupted();
    await runtime.scheduler.tick(await allHouseIds(database.db));
  };
  const evaluateAll = setInterval(() => {
    sweep().catch((error: unknown) => {
      log('periodic evaluation failed', error);
    });
  }, SWEEP_MS);
  evaluateAll.unref();
  // Longer than clients' keep-alive reuse, so a gateway never sends on a socket the server is closing.
  server.keepAliveTimeout = 65_000;
  server.headersTimeout = 66_000;
  server.on('error', (error: NodeJS.ErrnoException) => {
    console.error(
      error.code === 'EADDRINUSE'
        ? `[api] port ${config.port} is already in use`
        : `[api] cannot listen: ${error.message}`,
    );
    process.exit(1);
  });
  // A rolling restart loses nothing: stop taking work (readiness fails, no new connections), tell the
  // browsers to reconnect (to another process), finish what runs, give the leases back, then exit.
  const stop = () => {
    if (isStopping) return;
    isStopping = true;
    clearInterval(evaluateAll);
    clearInterval(housekeepingTimer);
    // Readiness fails at once; a balancer stops sending here within its next check, then this closes.
    console.log(`[api] stopping: taking no new work; closing in ${config.shutdownDrainMs} ms`);
    setTimeout(closeDown, config.shutdownDrainMs);
  };
  const closeDown = () => {
    live.close();
    server.close();
    server.closeIdleConnections();
    runtime.imports.dispose();
    runtime.notifier.dispose();
    const done = async () => {
      await Promise.race([
        Promise.all([runtime.scheduler.idle(), runtime.imports.idle()]),
        new Promise((resolve) => setTimeout(resolve, SHUTDOWN_GRACE_MS)),
      ]);
      runtime.scheduler.dispose();
      runtime.mailer.close();
      await releaseAllLeases(database.db, holder);
      await events.close();
      await database.close();
    };
    void done()
      .catch((error: unknown) => {
        log('shutdown did not finish cleanly', error);
      })
      .finally(() => process.exit(0));
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

void main().catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
