import { defineConfig } from 'vitest/config';

// Three projects: pure unit tests (parallel), API tests against the real
// PostgreSQL test database (one file at a time), and the browser smoke test.
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
          testTimeout: 60_000,
        },
      },
      {
        test: {
          name: 'api',
          include: ['tests/api/**/*.test.ts'],
          environment: 'node',
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          fileParallelism: false,
          testTimeout: 120_000,
          // A poll waits on a real server round trip (and the first request after start-up is slow on a busy
          // 2-core machine): vitest's default of 1 s made a passing step fail now and then.
          expect: { poll: { timeout: 15_000, interval: 100 } },
          hookTimeout: 180_000,
        },
      },
    ],
  },
});
