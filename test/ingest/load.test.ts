import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InProcessQueue } from '@stemwise/platform';
import { batchIssuesCsv, batchReport, submitBatch, type ServiceDeps } from '@stemwise/core';
import { processBatch } from '@stemwise/ingest';
import { testLogger, useServices, type TestServices } from '../support/services';
import { counts, depsFor, ingestDir, PLOTS, PLOTS_HEADER, SPECIES, STRATA, tempDir, TREES, TREES_HEADER, uploadFiles, writeUpload } from './support';

describe('ingest on PostgreSQL', () => {
  let s: TestServices;
  let deps: ServiceDeps;
  let queue: InProcessQueue;
  beforeAll(async () => {
    s = await useServices();
    queue = new InProcessQueue(testLogger());
    deps = depsFor({ ...s.config, storageDir: tempDir() }, s.db, queue);
  });
  afterAll(async () => s?.cleanup());
  const q = <T = Record<string, unknown>>(sql: string, params: unknown[] = []) => s.db.query<T>(sql, params);
  /** The clean batch with its strata and species list, loaded once: uploading the same content again is a duplicate and loads nothing. */
  const loadBase = () => ingestDir(deps, writeUpload({ plots: PLOTS, trees: TREES, strata: STRATA, species: SPECIES }));

  it('loads a clean batch in full: plots, visits, stems, strata, species, stale marks and the recompute job', async () => {
    const { submitted, report } = await loadBase();
    expect(report.state).toBe('loaded');
    expect(report.counts).toMatchObject({ plotsRows: 3, treesRows: 9, plotsLoaded: 3, stemsLoaded: 9, rowsSkipped: 0, errors: 0 });
    expect(report.progress).toMatchObject({ rowsLoaded: 9, bytesRead: report.progress.bytesTotal });
    const stems = await q<{ plot_key: string; tree_id: string; species: string | null; dbh_cm: number; height_m: number | null; status: string; stump_cause: string | null; fire_damage: number; in_subplot: boolean }>(
      `select p.plot_key, s.tree_id, s.species, s.dbh_cm, s.height_m, s.status, s.stump_cause, s.fire_damage, s.in_subplot
         from stems s join plot_visits v on v.id = s.visit_id join plots p on p.id = v.plot_id order by p.plot_key, s.tree_id`,
    );
    expect(stems).toHaveLength(9);
    expect(stems[0]).toEqual({ plot_key: 'MW-001', tree_id: '1', species: 'Ossara lumen', dbh_cm: 24.5, height_m: 18.2, status: 'live', stump_cause: null, fire_damage: 0, in_subplot: false });
    expect(stems[3]).toMatchObject({ tree_id: '4', in_subplot: true, dbh_cm: 7.5 });
    expect(stems[4]).toMatchObject({ tree_id: '5', status: 'stump', stump_cause: 'logged' });
    expect(stems[2]).toMatchObject({ tree_id: '3', species: null });
    const visits = await q<{ plot_key: string; survey_date: string; stale: boolean; subplot_area_ha: number; batch_id: string }>(
      `select p.plot_key, v.survey_date::text, v.stale, v.subplot_area_ha, v.batch_id from plot_visits v join plots p on p.id = v.plot_id order by 1`,
    );
    expect(visits.map((v) => [v.plot_key, v.survey_date, v.stale, v.batch_id])).toEqual([
      ['MW-001', '2023-05-14', true, submitted.batchId],
      ['MW-002', '2023-05-15', true, submitted.batchId],
      ['MW-003', '2023-06-02', true, submitted.batchId],
    ]);
    expect((await q(`select key from stale_work where kind = 'summary' order by key`)).map((r) => r.key)).toEqual(['Lowmere', 'Upper Tarn']);
    expect(await q(`select r.name, s.forest_type, s.forest_area_ha from strata s join regions r on r.id = s.region_id order by 1, 2`)).toHaveLength(3);
    expect(await q(`select name from species order by name`)).toHaveLength(3);
    expect(await q(`select synonym from species_synonyms order by synonym`)).toEqual([{ synonym: 'Ossara lucida' }, { synonym: 'Tikka rosea' }, { synonym: 'Tikka rufa' }]);
    expect(await queue.state(`recompute.batch.${submitted.batchId}`)).toBe('waiting');
    expect(fs.readdirSync(path.join(deps.config.storageDir, submitted.batchId)).sort()).toEqual(['plots.csv', 'species.csv', 'strata.csv', 'trees.csv']);
  });

  it('recognises the same content uploaded again, plain or gzipped, and loads nothing twice', async () => {
    const first = (await loadBase()).submitted.batchId;
    const before = await counts(s.db);
    const again = await submitBatch(deps, uploadFiles(writeUpload({ plots: PLOTS, trees: TREES, strata: STRATA, species: SPECIES }, { gzip: true })), {}, 'test');
    expect(again).toMatchObject({ duplicate: true, batchId: first });
    expect(await counts(s.db)).toEqual(before);
  });

  it('makes one batch of two identical uploads submitted at the same moment', async () => {
    const plots = `${PLOTS_HEADER}\nMW-100,Lowmere,dry,-3.5,27.9,1,10,0,5,2023-08-01,0,0,`;
    const trees = `${TREES_HEADER}\nMW-100,1,Tikka rubra,20,,live,,0,0`;
    const [a, b] = await Promise.all([0, 1].map(() => submitBatch(deps, uploadFiles(writeUpload({ plots, trees })), {}, 'test')));
    expect(a.batchId).toBe(b.batchId);
    expect([a.duplicate, b.duplicate].sort()).toEqual([false, true]);
    const [{ n }] = await q<{ n: number }>(`select count(*)::int n from batches where content_hash = (select content_hash from batches where id = $1)`, [a.batchId]);
    expect(n).toBe(1);
  });

  it('adds a re-measurement on a new date as a new visit, rejects the same date, and replaces it with --replace (audited)', async () => {
    const plots = `${PLOTS_HEADER}\nMW-200,Lowmere,dry,-3.6,28.0,1,10,0,5,2021-04-01,0,0,`;
    const trees = (dbh: number) => `${TREES_HEADER}\nMW-200,1,Tikka rubra,${dbh},,live,,0,0\nMW-200,2,Ossara lumen,30,,live,,0,0`;
    expect((await ingestDir(deps, writeUpload({ plots, trees: trees(20) }))).report.state).toBe('loaded');
    const later = plots.replace('2021-04-01', '2024-04-01');
    expect((await ingestDir(deps, writeUpload({ plots: later, trees: trees(21) }))).report.state).toBe('loaded');
    const visits = () => q<{ survey_date: string; n: number }>(
      `select v.survey_date::text, (select count(*)::int from stems s where s.visit_id = v.id) n from plot_visits v join plots p on p.id = v.plot_id where p.plot_key = 'MW-200' order by 1`,
    );
    expect(await visits()).toEqual([{ survey_date: '2021-04-01', n: 2 }, { survey_date: '2024-04-01', n: 2 }]);

    const before = await counts(s.db);
    const conflict = await ingestDir(deps, writeUpload({ plots: later, trees: trees(22) }));
    expect(conflict.report.state).toBe('rejected');
    expect(conflict.report.issues.find((g) => g.rule === 'cross_visit_exists')?.first[0]).toMatchObject({ file: 'plots.csv', line: 2, column: 'survey_date' });
    expect(await counts(s.db)).toEqual(before);

    const replaced = await ingestDir(deps, writeUpload({ plots: later, trees: trees(23) }), { replace: true });
    expect(replaced.report.state).toBe('loaded');
    expect(await visits()).toEqual([{ survey_date: '2021-04-01', n: 2 }, { survey_date: '2024-04-01', n: 2 }]);
    expect(await q(`select s.dbh_cm from stems s join plot_visits v on v.id = s.visit_id where v.survey_date = '2024-04-01' and s.tree_id = '1'`)).toEqual([{ dbh_cm: 23 }]);
    const audit = await q<{ action: string; target: string; details: { visits: Array<{ plotKey: string }> } }>(`select action, target, details from audit_log where action = 'visit.replace'`);
    expect(audit).toHaveLength(1);
    expect(audit[0].target).toBe(replaced.submitted.batchId);
    expect(audit[0].details.visits[0].plotKey).toBe('MW-200');
  });

  it('refuses a visit dated before the plot\'s latest stored visit (cross_visit_before_latest), and loads it with --replace', async () => {
    const plots = (date: string) => `${PLOTS_HEADER}\nMW-260,Lowmere,dry,-3.66,28.26,1,10,0,5,${date},0,0,`;
    const trees = `${TREES_HEADER}\nMW-260,1,Tikka rubra,20,,live,,0,0`;
    expect((await ingestDir(deps, writeUpload({ plots: plots('2023-04-01'), trees }))).report.state).toBe('loaded');
    const before = await counts(s.db);
    const earlier = await ingestDir(deps, writeUpload({ plots: plots('2020-04-01'), trees }));
    expect(earlier.report.state).toBe('rejected');
    const issue = earlier.report.issues.find((g) => g.rule === 'cross_visit_before_latest');
    expect(issue?.severity).toBe('error');
    expect(issue?.first[0]).toMatchObject({ file: 'plots.csv', line: 2, column: 'survey_date', value: '2020-04-01' });
    expect(issue?.first[0].message).toMatch(/before its latest stored visit of 2023-04-01/);
    expect(await counts(s.db)).toEqual(before);
    expect((await ingestDir(deps, writeUpload({ plots: plots('2020-04-01'), trees }), { replace: true })).report.state).toBe('loaded');
    const dates = await q<{ d: string }>(`select v.survey_date::text d from plot_visits v join plots p on p.id = v.plot_id where p.plot_key = 'MW-260' order by 1`);
    expect(dates.map((r) => r.d)).toEqual(['2020-04-01', '2023-04-01']);
  });

  it('checks a re-measurement tree by tree against the previous visit: revived trees refused, shrinking, fast growth and a new name warned', async () => {
    const plots = (date: string) => `${PLOTS_HEADER}\nMW-261,Lowmere,dry,-3.67,28.27,1,10,0,5,${date},0,0,`;
    const first = `${TREES_HEADER}\nMW-261,1,Tikka rubra,20,,live,,0,0\nMW-261,2,Ossara lumen,30,,dead,,0,0\nMW-261,3,Tikka rubra,12,,live,,0,0\nMW-261,4,Ossara lumen,25,,stump,logged,0,0\nMW-261,5,Tikka rubra,15,,live,,0,0`;
    expect((await ingestDir(deps, writeUpload({ plots: plots('2019-05-01'), trees: first }))).report.state).toBe('loaded');
    // 5 years later (1827 days): tree 1 lost 2 cm and changed name, tree 2 (dead) is live, tree 3 grew 48 cm (9.6 cm/yr), tree 4 (a stump) is live
    const second = `${TREES_HEADER}\nMW-261,1,Ossara lumen,18,,live,,0,0\nMW-261,2,Ossara lumen,30,,live,,0,0\nMW-261,3,Tikka rubra,60,,live,,0,0\nMW-261,4,Ossara lumen,25,,live,,0,0`;
    const before = await counts(s.db);
    const { report } = await ingestDir(deps, writeUpload({ plots: plots('2024-05-01'), trees: second }));
    expect(report.state).toBe('rejected');
    expect(await counts(s.db)).toEqual(before);
    const byRule = (rule: string) => report.issues.find((g) => g.rule === rule);
    expect(byRule('cross_tree_revived')?.severity).toBe('error');
    expect(byRule('cross_tree_revived')?.first.map((i) => i.line)).toEqual([3, 5]);
    expect(byRule('cross_tree_revived')?.first[0].message).toMatch(/tree 2 of plot MW-261 is live, but was recorded dead at the previous visit \(2019-05-01, batch /);
    expect(byRule('cross_tree_revived')?.first[1].message).toMatch(/recorded a stump \(logged\)/);
    expect(byRule('plausibility_dbh_shrank')?.first[0]).toMatchObject({ line: 2, column: 'dbh_cm', value: '18' });
    expect(byRule('plausibility_dbh_growth_fast')?.first[0]).toMatchObject({ line: 4, column: 'dbh_cm', value: '60' });
    expect(byRule('plausibility_dbh_growth_fast')?.first[0].message).toMatch(/9\.6 cm a year/);
    expect(byRule('plausibility_species_changed')?.first[0]).toMatchObject({ line: 2, column: 'species', value: 'Ossara lumen' });
    // Without the revived trees the re-measurement loads, with its warnings.
    const fixed = second.split('\n').filter((l) => !/^MW-261,[24],/.test(l)).join('\n');
    const ok = await ingestDir(deps, writeUpload({ plots: plots('2024-05-01'), trees: fixed }));
    expect(ok.report.state).toBe('loaded');
    // (plausibility_species_no_reference too when this test runs alone, before any species list is loaded)
    expect(ok.report.issues.map((g) => g.rule).filter((r) => r !== 'plausibility_species_no_reference').sort()).toEqual([
      'plausibility_dbh_growth_fast',
      'plausibility_dbh_shrank',
      'plausibility_species_changed',
      'plausibility_trees_absent',
    ]);
    // Tree 5 (live in 2019) is missing in 2024; 2 and 4 were dead or a stump, so their absence is no news.
    expect(ok.report.issues.find((g) => g.rule === 'plausibility_trees_absent')?.first[0]).toMatchObject({ file: 'plots.csv', line: 2 });
    expect(ok.report.issues.find((g) => g.rule === 'plausibility_trees_absent')?.first[0].message).toMatch(/1 tree live at the previous visit \(2019-05-01\) is not in trees\.csv \(tree_id 5\)/);
  });

  // One malformed re-measurement per cross-visit rule, each on a plot of its own: the issue names the
  // line (file and column) of this visit and the previous visit it was checked against by its date (and
  // batch, where the message gives one). Stored stems keep no line of their upload, so the previous
  // visit is named by date and batch, not by line.
  it.each([
    { rule: 'cross_tree_revived', severity: 'error', second: '1,Tikka rubra,20,,live,,0,0\n2,Ossara lumen,30,,live,,0,0', file: 'trees.csv', line: 3, column: 'status', value: 'live', says: /tree 2 of plot MW-27\d is live, but was recorded dead at the previous visit \(2019-05-01, batch / },
    { rule: 'plausibility_dbh_shrank', severity: 'warning', second: '1,Tikka rubra,18.5,,live,,0,0\n2,Ossara lumen,30,,dead,,0,0', file: 'trees.csv', line: 2, column: 'dbh_cm', value: '18.5', says: /but 20 at the previous visit \(2019-05-01\)/ },
    { rule: 'plausibility_dbh_growth_fast', severity: 'warning', second: '1,Tikka rubra,50,,live,,0,0\n2,Ossara lumen,30,,dead,,0,0', file: 'trees.csv', line: 2, column: 'dbh_cm', value: '50', says: /grew from 20 cm \(2019-05-01\) to 50 cm/ },
    { rule: 'plausibility_species_changed', severity: 'warning', second: '1,Ossara lumen,20.5,,live,,0,0\n2,Ossara lumen,30,,dead,,0,0', file: 'trees.csv', line: 2, column: 'species', value: 'Ossara lumen', says: /as Tikka rubra at the previous visit \(2019-05-01\)/ },
    { rule: 'plausibility_trees_absent', severity: 'warning', second: '2,Ossara lumen,30,,dead,,0,0', file: 'plots.csv', line: 2, column: undefined, value: undefined, says: /1 tree live at the previous visit \(2019-05-01\) is not in trees\.csv \(tree_id 1\)/ },
    { rule: 'cross_visit_before_latest', severity: 'error', second: '1,Tikka rubra,20,,live,,0,0', file: 'plots.csv', line: 2, column: 'survey_date', value: '2018-05-01', says: /is dated 2018-05-01, before its latest stored visit of 2019-05-01/ },
  ])('$rule: a malformed re-measurement is reported on its line, naming the previous visit', async (c) => {
    const key = `MW-27${['cross_tree_revived', 'plausibility_dbh_shrank', 'plausibility_dbh_growth_fast', 'plausibility_species_changed', 'plausibility_trees_absent', 'cross_visit_before_latest'].indexOf(c.rule)}`;
    const plots = (date: string) => `${PLOTS_HEADER}\n${key},Lowmere,dry,-3.68,28.28,1,10,0,5,${date},0,0,`;
    const stems = (lines: string) => `${TREES_HEADER}\n${lines.split('\n').map((l) => `${key},${l}`).join('\n')}`;
    const first = await ingestDir(deps, writeUpload({ plots: plots('2019-05-01'), trees: stems('1,Tikka rubra,20,,live,,0,0\n2,Ossara lumen,30,,dead,,0,0') }));
    expect(first.report.state).toBe('loaded');
    const date = c.rule === 'cross_visit_before_latest' ? '2018-05-01' : '2024-05-01';
    const { report } = await ingestDir(deps, writeUpload({ plots: plots(date), trees: stems(c.second) }));
    expect(report.state).toBe(c.severity === 'error' ? 'rejected' : 'loaded');
    const issue = report.issues.find((g) => g.rule === c.rule);
    expect(issue?.severity).toBe(c.severity);
    expect(issue?.first[0]).toMatchObject({ file: c.file, line: c.line, ...(c.column ? { column: c.column, value: c.value } : {}) });
    expect(issue?.first[0].message).toMatch(c.says);
    if (c.rule === 'cross_tree_revived') expect(issue?.first[0].message).toContain(first.submitted.batchId);
  });

  it('attaches stems of a stored plot without a plots row to its latest visit, and refuses a tree id already stored there', async () => {
    const plots = `${PLOTS_HEADER}\nMW-201,Lowmere,dry,-3.61,28.1,1,10,0,5,2022-04-01,0,0,`;
    const own = `${TREES_HEADER}\nMW-201,1,Tikka rubra,20,,live,,0,0`;
    expect((await ingestDir(deps, writeUpload({ plots, trees: own }))).report.state).toBe('loaded');
    const extraPlot = `${PLOTS_HEADER}\nMW-202,Lowmere,dry,-3.62,28.2,1,10,0,5,2022-04-02,0,0,`;
    const trees = `${TREES_HEADER}\nMW-202,1,Tikka rubra,20,,live,,0,0\nMW-201,2,Ossara lumen,40,,live,,0,0`;
    const { report } = await ingestDir(deps, writeUpload({ plots: extraPlot, trees }));
    expect(report.state).toBe('loaded');
    expect(report.counts.stemsLoaded).toBe(2);
    expect(await q(`select s.tree_id from stems s join plot_visits v on v.id = s.visit_id join plots p on p.id = v.plot_id where p.plot_key = 'MW-201' order by 1`)).toEqual([
      { tree_id: '1' },
      { tree_id: '2' },
    ]);
    const dup = await ingestDir(deps, writeUpload({ plots: extraPlot.replace('MW-202', 'MW-203').replace('-3.62', '-3.63'), trees: `${TREES_HEADER}\nMW-203,1,Tikka rubra,20,,live,,0,0\nMW-201,1,Ossara lumen,40,,live,,0,0` }));
    expect(dup.report.state).toBe('rejected');
    expect(dup.report.issues.find((g) => g.rule === 'cross_duplicate_tree')?.first[0]).toMatchObject({ line: 3 });
  });

  it('with --skip-invalid loads the valid rows, skips and records the bad ones', async () => {
    const plots = `${PLOTS_HEADER}\nMW-300,Lowmere,dry,-3.7,28.3,1,10,0,5,2023-01-10,0,0,\nMW-301,Lowmere,dry,-3.71,28.31,1,10,0,5,2023-13-10,0,0,`;
    const trees = `${TREES_HEADER}\nMW-300,1,Tikka rubra,20,,live,,0,0\nMW-300,2,Tikka rubra,0,,live,,0,0\nMW-300,3,Tikka rubra,25,,stump,,0,0\nMW-301,1,Tikka rubra,20,,live,,0,0\nMW-300,4,Tikka rubra,30,,live,,0,0`;
    const { report } = await ingestDir(deps, writeUpload({ plots, trees }), { skipInvalid: true });
    expect(report.state).toBe('loaded');
    expect(report.counts).toMatchObject({ plotsRows: 2, treesRows: 5, plotsLoaded: 1, stemsLoaded: 2, rowsSkipped: 4, errors: 4 });
    expect(report.issues.filter((g) => g.severity === 'error').map((g) => g.rule).sort()).toEqual(['cross_plot_rejected', 'field_bad_date', 'field_out_of_range', 'row_stump_cause_missing']);
    expect(await q(`select s.tree_id from stems s join plot_visits v on v.id = s.visit_id join plots p on p.id = v.plot_id where p.plot_key = 'MW-300' order by 1`)).toEqual([
      { tree_id: '1' },
      { tree_id: '4' },
    ]);
    expect(await q(`select 1 from plots where plot_key = 'MW-301'`)).toEqual([]);
  });

  it("reads semicolon-separated files with decimal commas when told to", async () => {
    const plots = `${PLOTS_HEADER}\nMW-400,Lowmere,dry,-3.8,28.4,0.5,10,0,5,2023-02-10,0,0,`.replace(/,/g, ';').replace('-3.8', '-3,8').replace('28.4', '28,4').replace(';0.5;', ';0,5;');
    const trees = `${TREES_HEADER}\nMW-400,1,Tikka rubra,20.5,14.25,live,,0,0`.replace(/,/g, ';').replace('20.5', '20,5').replace('14.25', '14,25');
    const { report } = await ingestDir(deps, writeUpload({ plots, trees }), { delimiter: ';', decimalComma: true });
    expect(report.state).toBe('loaded');
    expect(await q(`select p.latitude, v.area_ha, s.dbh_cm, s.height_m from stems s join plot_visits v on v.id = s.visit_id join plots p on p.id = v.plot_id where p.plot_key = 'MW-400'`)).toEqual([
      { latitude: -3.8, area_ha: 0.5, dbh_cm: 20.5, height_m: 14.25 },
    ]);
  });

  it('loads a batch with warnings only, and reports each plausibility rule', async () => {
    await loadBase(); // MW-502 below sits on the stored MW-001
    const plots = [
      `${PLOTS_HEADER},crew`,
      'MW-500,Lowmere,dry,-3.9,28.5,1,10,0,5,1948-02-10,0,0,,A',
      'MW-501,Lowmere,dry,-3.9,28.5,1,10,0,5,2023-02-10,0,0,,B', // same place as MW-500
      'MW-502,Lowmere,dry,-3.1201,27.4410,1,10,0,5,2023-02-11,0,0,,B', // same place as stored MW-001
      'MW-503,Lowmere,dry,-3.95,28.6,1,10,0,5,2023-02-12,0,0,,C', // no stems
    ].join('\n');
    const trees = [
      TREES_HEADER,
      'MW-500,1,Tikka rubra,350,,live,,0,0', // large, and with the others of MW-500 a millimetre-looking plot
      'MW-500,2,Tikka rubra,210,,live,,0,0',
      'MW-500,3,Tikka rubra,180,,live,,0,0',
      'MW-501,1,Tikka rubra,30,45,live,,0,0', // H/D 150
      'MW-501,2,Tikka rubra,50,8,live,,0,0', // H/D 16
      'MW-501,3,Tikka rubra,200,85,live,,0,0', // tall
      'MW-501,4,Tikka rubra,8,,live,,0,0', // below dbh_min on the main plot
      'MW-502,1,Ossara sp.,30,,live,,0,0',
      'MW-502,2,"=HYPERLINK(""x"")",30,,live,,0,0',
    ].join('\n');
    const { submitted, report } = await ingestDir(deps, writeUpload({ plots, trees }));
    expect(report.state).toBe('loaded');
    expect(report.counts.errors).toBe(0);
    const rules = Object.fromEntries(report.issues.map((g) => [g.rule, g]));
    expect(Object.keys(rules).sort()).toEqual([
      'cross_main_stem_below_min',
      'cross_plot_without_stems',
      'plausibility_dbh_large',
      'plausibility_dbh_looks_mm',
      'plausibility_height_for_diameter',
      'plausibility_height_tall',
      'plausibility_same_coordinates',
      'plausibility_species_genus_only',
      'plausibility_species_unknown',
      'plausibility_survey_date_early',
      'structure_unknown_column',
    ]);
    expect(rules.plausibility_height_for_diameter.count).toBe(2);
    expect(rules.plausibility_same_coordinates.first.map((f) => f.line)).toEqual([3, 4]);
    expect(rules.cross_plot_without_stems.first[0]).toMatchObject({ file: 'plots.csv', line: 5 });
    expect(rules.plausibility_dbh_looks_mm.first[0].message).toMatch(/MW-500: 3 of 3 stems/);
    const csv = await batchIssuesCsv(s.db, submitted.batchId, 'all');
    expect(csv).toContain(`,"'=HYPERLINK(""x"")",`);
    expect(csv!.split('\n')[0]).toBe('severity,rule,file,line,column,value,message');
  });

  it('counts every issue but stores at most 1,000 of a rule, and reports the exact total', async () => {
    const plots = `${PLOTS_HEADER}\nMW-600,Lowmere,dry,-4,29,1,10,0,5,2023-02-10,0,0,`;
    const rows = Array.from({ length: 2500 }, (_, i) => `MW-600,${i},Tikka rubra,-${i + 1},,live,,0,0`);
    const { submitted, report } = await ingestDir(deps, writeUpload({ plots, trees: [TREES_HEADER, ...rows].join('\n') }));
    expect(report.state).toBe('rejected');
    expect(report.counts.errors).toBe(2500);
    expect(report.issues.find((g) => g.rule === 'field_out_of_range')?.count).toBe(2500);
    const [{ n }] = await q<{ n: number }>(`select count(*)::int n from batch_issues where batch_id = $1 and rule = 'field_out_of_range'`, [submitted.batchId]);
    expect(n).toBe(1001);
    const csv = (await batchIssuesCsv(s.db, submitted.batchId))!;
    expect(csv.split('\n').filter((l) => l.startsWith('error,field_out_of_range')).length).toBe(1001);
    expect(csv).toContain(`,'-1,`);
  });

  it('on a retry of a loaded batch only queues its recompute again; a batch caught mid-validation starts over', async () => {
    await loadBase(); // with a species list loaded, the retried batch has no issues at all
    const plots = `${PLOTS_HEADER}\nMW-700,Lowmere,dry,-4.1,29.1,1,10,0,5,2023-02-10,0,0,`;
    const trees = `${TREES_HEADER}\nMW-700,1,Tikka rubra,20,,live,,0,0`;
    const { submitted } = await ingestDir(deps, writeUpload({ plots, trees }));
    const before = await counts(s.db);
    const fresh = new InProcessQueue(testLogger());
    expect(await processBatch({ ...deps, queue: fresh }, submitted.batchId)).toEqual({ state: 'loaded' });
    expect(await fresh.state(`recompute.batch.${submitted.batchId}`)).toBe('waiting');
    expect(await counts(s.db)).toEqual(before);

    const second = await submitBatch(deps, uploadFiles(writeUpload({ plots: plots.replace(/MW-700/g, 'MW-701').replace('-4.1', '-4.2'), trees: trees.replace('MW-700', 'MW-701') })), {}, 'test');
    await q(`update batches set state = 'validating', attempts = 1 where id = $1`, [second.batchId]);
    await q(`insert into batch_issues (batch_id, severity, rule, file, line, message) values ($1, 'error', 'field_required', 'trees.csv', 9, 'left by a dead worker')`, [second.batchId]);
    expect(await processBatch(deps, second.batchId)).toEqual({ state: 'loaded' });
    const report = (await batchReport(s.db, second.batchId))!;
    expect(report.attempts).toBe(2);
    expect(report.issues).toEqual([]);
    expect(report.counts.stemsLoaded).toBe(1);
  });

  it('runs two attempts at the same batch one after the other, and loads it once', async () => {
    const plots = `${PLOTS_HEADER}\nMW-800,Lowmere,dry,-4.3,29.3,1,10,0,5,2023-02-10,0,0,`;
    const trees = `${TREES_HEADER}\nMW-800,1,Tikka rubra,20,,live,,0,0\nMW-800,2,Tikka rubra,22,,live,,0,0`;
    const submitted = await submitBatch(deps, uploadFiles(writeUpload({ plots, trees })), {}, 'test');
    const results = await Promise.all([processBatch(deps, submitted.batchId), processBatch(deps, submitted.batchId)]);
    expect(results).toEqual([{ state: 'loaded' }, { state: 'loaded' }]);
    expect(await q(`select count(*)::int n from stems s join plot_visits v on v.id = s.visit_id join plots p on p.id = v.plot_id where p.plot_key = 'MW-800'`)).toEqual([{ n: 2 }]);
    expect((await batchReport(s.db, submitted.batchId))!.attempts).toBe(1);
  });
});
