import { createApp, createRuntime, type Runtime } from '../app';
import type { Database } from '@tierscope/db';
import type { EventBus } from '../platform/events';

export const TEST_JWT_SECRET = 'test-secret-that-is-long-enough-for-hs256-0123456789';

const config = {
  jwtSecret: TEST_JWT_SECRET,
  tokenTtlSeconds: 3600,
  loginMaxFailures: 1000,
  loginWindowSeconds: 60,
  webDist: undefined,
};

/**
 * The runtime as `npm start` builds it. Its evaluation scheduler reacts to ingest events; suites that do not
 * test evaluation get one with the scheduler switched off, so no background work outlives their database.
 */
export function createTestRuntime(
  db: Database,
  options: { events?: EventBus; isEvaluating?: boolean } = {},
): Runtime {
  const runtime = createRuntime({
    db,
    config,
    log: () => undefined,
    ...(options.events ? { events: options.events } : {}),
  });
  if (!options.isEvaluating) runtime.scheduler.dispose();
  return runtime;
}

/** The real app in-process, as `npm start` builds it, minus the web files. */
export function createTestApp(
  db: Database,
  overrides: { loginMaxFailures?: number; events?: EventBus; runtime?: Runtime } = {},
) {
  return createApp({
    db,
    config: { ...config, loginMaxFailures: overrides.loginMaxFailures ?? 1000 },
    log: () => undefined,
    info: () => undefined,
    runtime:
      overrides.runtime ??
      createTestRuntime(db, overrides.events ? { events: overrides.events } : {}),
  });
}
