import { defineConfig } from 'vitest/config';

/**
 * Server-side and library suites. The Angular specs run through `ng test` (the Angular builder ignores
 * this file); `npm test` runs both and adds up the counts.
 */
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'libs',
          include: [
            'libs/**/*.spec.ts',
            'simulator/**/*.spec.ts',
            'scripts/**/*.spec.ts',
            'mail-catcher/**/*.spec.ts',
          ],
          environment: 'node',
        },
      },
      {
        test: {
          name: 'api',
          include: [
            'apps/api/**/*.spec.ts',
            'db/**/*.spec.ts',
            'tests/integration/**/*.spec.ts',
            'tests/robustness/**/*.spec.ts',
            'tests/cluster/**/*.spec.ts',
          ],
          environment: 'node',
          // Each file makes its own database; two files at once would still be fine, but 2 cores are few.
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.e2e.ts'],
          environment: 'node',
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
    ],
  },
});
