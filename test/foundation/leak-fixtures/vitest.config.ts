import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

// Run only by test/foundation/open-handles.test.ts, in a vitest of its own, with the suite's leak check.
const here = path.dirname(fileURLToPath(import.meta.url));

export default defineConfig({
  test: {
    root: here,
    include: ['*.fixture.ts'],
    pool: 'forks',
    maxWorkers: 1,
    // after-hooks in reverse order of registration: the leak check's afterAll runs after the file's own
    sequence: { hooks: 'stack' },
    setupFiles: [path.join(here, '../../support/leak-check.ts')],
  },
});
