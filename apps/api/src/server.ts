import { openDatabase, runMigrations } from '@tierscope/db';
import { createApp, createRuntime } from './app';
import { allHouseIds } from './features/evaluation/evaluation.repository';
import { attachLive } from './realtime/live';
import { maintainReadingPartitions } from './features/ingest/retention';
import { loadConfig } from './platform/config';

/** Starts the API on its own (npm run api); `npm start` starts it through scripts/start.ts instead. */
async function main(): Promise<void> {
  const config = loadConfig(process.env);
  const database = openDatabase(config.databaseUrl);
  await runMigrations(database.db);
  const housekeeping = async () => {
    const { dropped } = await maintainReadingPartitions(
      database.db,
      config.readingsRetentionMonths,
    );
    if (dropped.length > 0) console.log(`[api] retention: dropped ${dropped.join(', ')}`);
  };
  await housekeeping();
  // Daily; unref'd so it never keeps the process alive on shutdown.
  setInterval(
    () => {
      housekeeping().catch((error: unknown) => {
        console.error('[api] partition housekeeping failed', error);
      });
    },
    24 * 3600 * 1000,
  ).unref();
  const log = (message: string, error?: unknown) => {
    console.error(`[api] ${message}`, error ?? '');
  };
  const runtime = createRuntime({ db: database.db, config, log });
  const app = createApp({ db: database.db, config, runtime, log });
  runtime.notifier.start();
  const resumed = await runtime.imports.resumeInterrupted();
  if (resumed > 0) console.log(`[api] imports: ${resumed} interrupted import(s) queued again`);
  if (config.mailCatcherUrl)
    console.log(`[api] mail goes to the local catcher (${config.smtpUrl ?? 'no SMTP_URL'})`);
  const server = app.listen(config.port, config.host, () => {
    console.log(`[api] listening on http://${config.host}:${config.port}`);
  });
  const live = attachLive(server, { db: database.db, ...runtime, log });
  // Silent counters need time to pass, not data: every house is evaluated each minute too.
  const evaluateAll = setInterval(() => {
    allHouseIds(database.db)
      .then((ids) => runtime.scheduler.tick(ids))
      .catch((error: unknown) => {
        log('periodic evaluation failed', error);
      });
  }, 60_000);
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
  const stop = () => {
    clearInterval(evaluateAll);
    live.close();
    runtime.scheduler.dispose();
    runtime.notifier.dispose();
    runtime.imports.dispose();
    runtime.mailer.close();
    server.close(() => void database.close().then(() => process.exit(0)));
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

void main().catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
