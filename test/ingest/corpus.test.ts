import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ServiceDeps } from '@stemwise/core';
import { useServices, type TestServices } from '../support/services';
import { CORPUS } from './corpus';
import { counts, depsFor, ingestDir, PLOTS, tempDir, TREES, writeUpload } from './support';

// Sixteen faults of different kinds planted in trees.csv of an otherwise loadable batch (plots.csv
// is clean, so the batch starts loading): one upload gives one report that names all sixteen, the
// duplicate tree ids among them, with nothing loaded. Lines count the header as line 1; the nine
// fixture rows are lines 2–10.
const PLANTED: Array<[rule: string, line: number, row: string]> = [
  ['field_out_of_range', 11, 'MW-001,11,Ossara lumen,0,,live,,0,0'],
  ['field_not_number', 12, 'MW-001,12,Ossara lumen,big,,live,,0,0'],
  ['field_not_allowed', 13, 'MW-001,13,Ossara lumen,20,,alive,,0,0'],
  ['field_required', 14, 'MW-001,14,Ossara lumen,20,,,,0,0'],
  ['field_not_integer', 15, 'MW-001,15,Ossara lumen,20,,live,,4,0'],
  ['field_out_of_range', 16, 'MW-001,16,Ossara lumen,20,1.2,live,,0,0'],
  ['row_stump_cause_missing', 17, 'MW-001,17,Ossara lumen,20,,stump,,0,0'],
  ['row_stump_cause_not_stump', 18, 'MW-001,18,Ossara lumen,20,,live,natural,0,0'],
  ['cross_unknown_plot', 19, 'MW-999,1,Ossara lumen,20,,live,,0,0'],
  ['cross_subplot_missing', 20, 'MW-002,20,Ossara lumen,6,,live,,0,1'],
  ['cross_subplot_stem_too_big', 21, 'MW-001,21,Ossara lumen,12,,live,,0,1'],
  ['structure_ragged_row', 22, 'MW-001,22,Ossara lumen,20,,live,,0'],
  ['structure_bad_quotes', 23, 'MW-001,23,"Ossara lumen"x,20,,live,,0,0'],
  ['cross_duplicate_tree', 24, 'MW-001,1,Ossara lumen,30,,live,,0,0'],
  ['cross_duplicate_tree', 25, 'MW-002,2,Tikka rubra,30,,live,,0,0'],
  ['field_too_long', 26, `MW-003,${'t'.repeat(65)},indet,11.2,,live,,0,0`],
];

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
    if (c.expect.column) expect(group!.first.find((f) => f.file === c.expect.file && f.line === c.expect.line)!.column).toBe(c.expect.column);
    expect(group!.first[0].message.length).toBeGreaterThan(10);
    expect(report.counts.errors).toBeGreaterThan(0);
    expect(report.counts.stemsLoaded).toBe(0);
    expect(await counts(s.db)).toEqual(before);
  });

  it('names all 16 planted faults (field, row, structure, cross-file and duplicate tree ids) in one report', async () => {
    const before = await counts(s.db);
    const trees = [TREES, ...PLANTED.map(([, , row]) => row)].join('\n');
    const { report } = await ingestDir(deps, writeUpload({ plots: PLOTS, trees }));
    expect(report.state).toBe('rejected');
    expect(report.attempts).toBe(1);
    const found = report.issues
      .filter((g) => g.severity === 'error')
      .flatMap((g) => g.first.map((f) => [g.rule, f.file, f.line] as const))
      .sort((a, b) => a[2]! - b[2]!);
    expect(found).toEqual(PLANTED.map(([rule, line]) => [rule, 'trees.csv', line]));
    expect(report.counts.errors).toBe(16);
    expect(report.issues.find((g) => g.rule === 'cross_duplicate_tree')!.first.map((f) => f.message)).toEqual([
      'tree_id 1 of plot MW-001 already appears on line 2',
      'tree_id 2 of plot MW-002 already appears on line 8',
    ]);
    expect(report.counts.stemsLoaded).toBe(0);
    expect(await counts(s.db)).toEqual(before);
  });
});
