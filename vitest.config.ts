import { defineConfig } from 'vitest/config';

// Two projects. `unit`: tests beside the code (src/**/*.test.ts in any package), pure, no services.
// `integration`: integration, end-to-end, fault, browser and reference-check suites under test/; every
// file that needs a database or Redis gets its own (see test/support/services.ts), so files run in
// parallel. Both fail a test file that leaves sockets, servers, timers or child processes open
// (test/support/leak-check.ts).
const exclude = ['**/node_modules/**'];
const setupFiles = ['test/support/leak-check.ts'];

export default defineConfig({
  test: {
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: 'forks',
    maxWorkers: 2,
    // after-hooks in reverse order of registration: the leak check's afterAll runs after the file's own
    sequence: { hooks: 'stack' },
    projects: [
      { extends: true, test: { name: 'unit', include: ['**/src/**/*.test.ts'], exclude, setupFiles } },
      {
        extends: true,
        test: { name: 'integration', include: ['test/**/*.test.ts'], exclude, setupFiles, globalSetup: ['test/support/global-setup.ts'] },
      },
    ],
  },
});
