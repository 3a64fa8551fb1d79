import { createApp } from '../app';
import type { Database } from '@tierscope/db';
import type { EventBus } from '../platform/events';

export const TEST_JWT_SECRET = 'test-secret-that-is-long-enough-for-hs256-0123456789';

/** The real app in-process, as `npm start` builds it, minus the web files. */
export function createTestApp(
  db: Database,
  overrides: { loginMaxFailures?: number; events?: EventBus } = {},
) {
  return createApp({
    db,
    config: {
      jwtSecret: TEST_JWT_SECRET,
      tokenTtlSeconds: 3600,
      loginMaxFailures: overrides.loginMaxFailures ?? 1000,
      loginWindowSeconds: 60,
      webDist: undefined,
    },
    log: () => undefined,
    info: () => undefined,
    ...(overrides.events ? { events: overrides.events } : {}),
  });
}
