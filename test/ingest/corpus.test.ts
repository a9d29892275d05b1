import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ServiceDeps } from '@stemwise/core';
import { useServices, type TestServices } from '../support/services';
import { CORPUS } from './corpus';
import { counts, depsFor, ingestDir, tempDir, writeUpload } from './support';

// Every malformed upload of the corpus is rejected: its rule is reported on its file and line, and
// not one row of any table the load writes has changed.
describe('corpus of malformed uploads (PostgreSQL)', () => {
  let s: TestServices;
  let deps: ServiceDeps;
  beforeAll(async () => {
    s = await useServices();
    deps = depsFor({ ...s.config, storageDir: tempDir() }, s.db);
  });
  afterAll(async () => s?.cleanup());

  it('holds at least 30 cases with distinct names', () => {
    expect(CORPUS.length).toBeGreaterThanOrEqual(30);
    expect(new Set(CORPUS.map((c) => c.name)).size).toBe(CORPUS.length);
  });

  it.each(CORPUS.map((c) => [c.name, c] as const))('%s', async (_name, c) => {
    const before = await counts(s.db);
    const { report } = await ingestDir(deps, writeUpload(c.files, { gzip: c.gzip }), c.options);
    expect(report.state).toBe('rejected');
    const group = report.issues.find((g) => g.rule === c.expect.rule);
    expect(group, `issues: ${JSON.stringify(report.issues.map((g) => [g.rule, g.first[0]]))}`).toBeDefined();
    expect(group!.severity).toBe('error');
    expect(group!.first.map((f) => [f.file, f.line])).toContainEqual([c.expect.file, c.expect.line]);
    expect(group!.first[0].message.length).toBeGreaterThan(10);
    expect(report.counts.errors).toBeGreaterThan(0);
    expect(report.counts.stemsLoaded).toBe(0);
    expect(await counts(s.db)).toEqual(before);
  });
});
