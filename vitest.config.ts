import { defineConfig } from 'vitest/config';

// Unit tests live beside the code (src/**/*.test.ts); integration, end-to-end, fault, browser and
// reference-check suites live under test/. Every file that needs a database or Redis gets its own
// (see test/support/services.ts), so files run in parallel.
export default defineConfig({
  test: {
    include: ['**/src/**/*.test.ts', 'test/**/*.test.ts'],
    exclude: ['**/node_modules/**'],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: 'forks',
    maxWorkers: 2,
    globalSetup: ['test/support/global-setup.ts'],
  },
});
