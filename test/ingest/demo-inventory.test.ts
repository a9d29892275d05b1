import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateInventory, SECOND_VISIT_DIR } from '@stemwise/demo-inventory';
import type { ServiceDeps } from '@stemwise/core';
import { useServices, type TestServices } from '../support/services';
import { counts, depsFor, ingestDir, tempDir } from './support';

// A cross-check against an independent reading of the format: the demo generator (written by another
// engineer from the same spec) plants bad rows of known kinds and records their file and line. Each
// must be reported there under the rule we give that kind, and no other line may get an error.
const RULE_OF_KIND: Record<string, string> = {
  plot_id_duplicate: 'cross_duplicate_plot',
  plot_id_bad_characters: 'field_bad_characters',
  latitude_out_of_range: 'field_out_of_range',
  forest_type_unknown: 'field_unknown_forest_type',
  area_out_of_range: 'field_out_of_range',
  subplot_not_smaller: 'row_subplot_area_too_large',
  survey_date_in_future: 'field_date_in_future',
  survey_date_malformed: 'field_bad_date',
  logging_class_out_of_range: 'field_not_integer',
  required_plot_field_missing: 'field_required',
  dbh_not_positive: 'field_out_of_range',
  dbh_above_limit: 'field_out_of_range',
  dbh_not_a_number: 'field_not_number',
  dbh_missing: 'field_required',
  status_unknown: 'field_not_allowed',
  stump_without_cause: 'row_stump_cause_missing',
  stump_cause_on_standing_stem: 'row_stump_cause_not_stump',
  stump_cause_unknown_value: 'field_not_allowed',
  tree_plot_unknown: 'cross_unknown_plot',
  tree_id_duplicate: 'cross_duplicate_tree',
  height_out_of_range: 'field_out_of_range',
  fire_damage_out_of_range: 'field_not_integer',
  subplot_stem_too_large: 'cross_subplot_stem_too_big',
  in_subplot_not_a_flag: 'field_not_allowed',
};
// Stems of a plot whose own row is bad are refused as a consequence, not as a planted error.
const CONSEQUENCES = new Set(['cross_plot_rejected']);

describe('the demo inventory through ingest', () => {
  let s: TestServices;
  let deps: ServiceDeps;
  beforeAll(async () => {
    s = await useServices();
    deps = depsFor({ ...s.config, storageDir: tempDir() }, s.db);
  });
  afterAll(async () => s?.cleanup());

  it('reports every planted bad row on its line under its rule, and nothing else as an error', async () => {
    const out = tempDir();
    const { truth } = await generateInventory({ outDir: out, plots: 120, seed: 11, badRows: 48 });
    fs.rmSync(path.join(out, 'truth.json'));
    const before = await counts(s.db);
    const { submitted, report } = await ingestDir(deps, out);
    expect(report.state).toBe('rejected');
    expect(await counts(s.db)).toEqual(before);
    const issues = await s.db.query<{ rule: string; file: string; line: number | null }>(
      `select rule, file, line from batch_issues where batch_id = $1 and severity = 'error'`,
      [submitted.batchId],
    );
    const at = new Set(issues.map((i) => `${i.file}:${i.line}:${i.rule}`));
    const bad = truth.bad_rows;
    expect(bad.length).toBeGreaterThanOrEqual(40);
    for (const b of bad) {
      const rule = RULE_OF_KIND[b.kind];
      expect(rule, `a rule for kind ${b.kind}`).toBeDefined();
      expect(at.has(`${b.file}:${b.line}:${rule}`), `${b.kind} at ${b.file}:${b.line} as ${rule}`).toBe(true);
    }
    const planted = new Set(bad.map((b) => `${b.file}:${b.line}`));
    const stray = issues.filter((i) => !CONSEQUENCES.has(i.rule) && !planted.has(`${i.file}:${i.line}`));
    expect(stray).toEqual([]);
  });

  it('loads the clean demo inventory with no error, then recognises it when uploaded again', async () => {
    const out = tempDir();
    const { truth } = await generateInventory({ outDir: out, plots: 60, seed: 12, gzip: true });
    fs.rmSync(path.join(out, 'truth.json'));
    const { submitted, report } = await ingestDir(deps, out);
    expect(report.counts.errors).toBe(0);
    expect(report.state).toBe('loaded');
    expect(report.counts.stemsLoaded).toBe(truth.counts.stems.rows);
    expect(report.counts.plotsLoaded).toBe(truth.counts.plots);
    const again = await ingestDir(deps, out);
    expect(again.submitted).toMatchObject({ duplicate: true, batchId: submitted.batchId });
    // The second visit, a batch of its own, passes every cross-visit rule: no tree revived, none shrunk
    // by more than 1 cm or grown more than 5 cm a year, no name changed; fallen trees are only warned about.
    const second = await ingestDir(deps, path.join(out, SECOND_VISIT_DIR));
    expect(second.report.counts.errors).toBe(0);
    expect(second.report.state).toBe('loaded');
    expect(second.report.counts.stemsLoaded).toBe(truth.change.second_visits.stem_rows);
    expect(second.report.counts.plotsLoaded).toBe(Object.values(truth.change.second_visits.plots_by_forest_type).reduce((a, b) => a + b, 0));
    const warned = second.report.issues.map((g) => g.rule).filter((r) => !r.startsWith('plausibility_species_') || r === 'plausibility_species_changed');
    // (a stump is recorded at its cut surface, DBH / 0.8, so a felled giant may read over 250 cm)
    expect(warned).toContain('plausibility_trees_absent');
    expect(warned.filter((r) => r !== 'plausibility_trees_absent' && r !== 'plausibility_dbh_large')).toEqual([]);
  });
});
