import { createApp, createRuntime, type Runtime } from '../app';
import type { Database } from '@tierscope/db';
import type { EventBus } from '../platform/events';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export const TEST_JWT_SECRET = 'test-secret-that-is-long-enough-for-hs256-0123456789';

const baseConfig = {
  jwtSecret: TEST_JWT_SECRET,
  tokenTtlSeconds: 3600,
  loginMaxFailures: 1000,
  loginWindowSeconds: 60,
  webDist: undefined,
  publicUrl: 'http://tierscope.test',
  smtpUrl: undefined as string | undefined,
  mailFrom: 'Tierscope <tierscope@tierscope.test>',
  mailCatcherUrl: undefined as string | undefined,
  exceptionMailSeconds: 3600,
  dataDir: join(tmpdir(), 'tierscope-api-tests'),
  photoMaxBytes: 512 * 1024,
  importMaxBytes: 5 * 1024 * 1024,
};

/** What a suite may change of the API's settings (mail transport, data folder, limits). */
export type TestConfig = Partial<typeof baseConfig>;

/**
 * The runtime as `npm start` builds it. Its evaluation scheduler reacts to ingest events; suites that do not
 * test evaluation get one with the scheduler switched off, so no background work outlives their database.
 */
export function createTestRuntime(
  db: Database,
  options: { events?: EventBus; isEvaluating?: boolean; config?: TestConfig } = {},
): Runtime {
  const runtime = createRuntime({
    db,
    config: { ...baseConfig, ...options.config },
    log: () => undefined,
    info: () => undefined,
    ...(options.events ? { events: options.events } : {}),
  });
  if (!options.isEvaluating) runtime.scheduler.dispose();
  return runtime;
}

/** The real app in-process, as `npm start` builds it, minus the web files. */
export function createTestApp(
  db: Database,
  overrides: {
    loginMaxFailures?: number;
    events?: EventBus;
    runtime?: Runtime;
    config?: TestConfig;
  } = {},
) {
  const config = {
    ...baseConfig,
    ...overrides.config,
    loginMaxFailures: overrides.loginMaxFailures ?? 1000,
  };
  return createApp({
    db,
    config,
    log: () => undefined,
    info: () => undefined,
    runtime:
      overrides.runtime ??
      createTestRuntime(db, {
        ...(overrides.events ? { events: overrides.events } : {}),
        config,
      }),
  });
}
