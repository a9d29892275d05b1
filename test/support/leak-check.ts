import { afterAll } from 'vitest';
import { describeLeaks, findLeaks, snapshotResources, traceCreations } from './open-handles';

// A setup file runs again at the start of each test file, so this baseline is what the worker held
// before the file began. Vitest runs after-hooks in stack order (sequence.hooks 'stack'): this afterAll,
// registered before the file's own, runs after all of them (test/foundation/open-handles.test.ts checks it).
const baseline = snapshotResources();
const creations = traceCreations();

afterAll(async () => {
  const leaks = await findLeaks(baseline);
  if (leaks.length === 0) return;
  const where = creations ? `\n${creations().join('\n')}` : ' (run with STEMWISE_LEAK_TRACE=1 to see where each was created)';
  throw new Error(describeLeaks(leaks) + where);
});
