import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BAD_ROW_KINDS, planBadRows } from './bad-rows';
import { PLOT_COLUMNS, TREE_COLUMNS } from './csv-lines';
import { generateInventory, type GenerateResult } from './generate';
import { Rng } from './random';

let dir: string;
let clean: GenerateResult;
let dirty: GenerateResult;
const lines = async (f: string) => (await readFile(f, 'utf8')).split('\n');

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'demo-inventory-bad-'));
  clean = await generateInventory({ outDir: join(dir, 'clean'), plots: 30, seed: 5 });
  dirty = await generateInventory({ outDir: join(dir, 'dirty'), plots: 30, seed: 5, badRows: BAD_ROW_KINDS.length + 6 });
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('bad rows', () => {
  it('lists every kind once before any repeats, with its file, line and rule', () => {
    const rows = dirty.truth.bad_rows;
    expect(rows).toHaveLength(BAD_ROW_KINDS.length + 6);
    expect(new Set(rows.map((r) => r.kind))).toEqual(new Set(BAD_ROW_KINDS.map((k) => k.kind)));
    for (const r of rows) {
      expect(r.line).toBeGreaterThan(1);
      expect(r.rule.length).toBeGreaterThan(10);
      expect(BAD_ROW_KINDS.find((k) => k.kind === r.kind)!.file).toBe(r.file);
    }
  });

  it('leaves the good rows exactly as without bad rows: dropping the listed lines gives the clean files', async () => {
    for (const file of ['plots.csv', 'trees.csv'] as const) {
      const name = file === 'plots.csv' ? 'plots' : 'trees';
      const listed = new Set(dirty.truth.bad_rows.filter((r) => r.file === file).map((r) => r.line));
      const kept = (await lines(dirty.files[name])).filter((_, i) => !listed.has(i + 1));
      expect(kept).toEqual(await lines(clean.files[name]));
    }
  });

  it('puts at each listed line a row that breaks the named rule', async () => {
    const files = { 'plots.csv': await lines(dirty.files.plots), 'trees.csv': await lines(dirty.files.trees) };
    const cleanPlotIds = new Set((await lines(clean.files.plots)).slice(1).map((l) => l.split(',')[0]));
    for (const r of dirty.truth.bad_rows) {
      const text = files[r.file][r.line - 1];
      const columns: readonly string[] = r.file === 'plots.csv' ? PLOT_COLUMNS : TREE_COLUMNS;
      const cells = Object.fromEntries(text.split(',').map((v, i) => [columns[i], v]));
      expect(cells.plot_id).toBe(r.plot_id);
      if (r.tree_id !== undefined) expect(cells.tree_id).toBe(r.tree_id);
      const broken: Record<string, () => boolean> = {
        plot_id_duplicate: () => cleanPlotIds.has(cells.plot_id),
        plot_id_bad_characters: () => !/^[A-Za-z0-9_.-]{1,64}$/.test(cells.plot_id),
        latitude_out_of_range: () => Math.abs(Number(cells.latitude)) > 90,
        forest_type_unknown: () => !['wet', 'moist', 'dry'].includes(cells.forest_type),
        area_out_of_range: () => !(Number(cells.area_ha) > 0 && Number(cells.area_ha) <= 25),
        subplot_not_smaller: () => Number(cells.subplot_area_ha) >= Number(cells.area_ha),
        survey_date_in_future: () => cells.survey_date > '2030-01-01',
        survey_date_malformed: () => !/^\d{4}-\d\d-\d\d$/.test(cells.survey_date),
        logging_class_out_of_range: () => Number(cells.logging_class) > 3,
        required_plot_field_missing: () => cells.longitude === '',
        dbh_not_positive: () => Number(cells.dbh_cm) <= 0 && cells.dbh_cm !== '',
        dbh_above_limit: () => Number(cells.dbh_cm) > 500,
        dbh_not_a_number: () => Number.isNaN(Number(cells.dbh_cm)),
        dbh_missing: () => cells.dbh_cm === '',
        status_unknown: () => !['live', 'dead', 'stump'].includes(cells.status),
        stump_without_cause: () => cells.status === 'stump' && cells.stump_cause === '',
        stump_cause_on_standing_stem: () => cells.status !== 'stump' && cells.stump_cause !== '',
        stump_cause_unknown_value: () => !['logged', 'natural', 'unknown', ''].includes(cells.stump_cause),
        tree_plot_unknown: () => !cleanPlotIds.has(cells.plot_id),
        tree_id_duplicate: () => files['trees.csv'].filter((l) => l.startsWith(`${cells.plot_id},${cells.tree_id},`)).length === 2,
        height_out_of_range: () => Number(cells.height_m) <= 1.3 || Number(cells.height_m) > 100,
        fire_damage_out_of_range: () => Number(cells.fire_damage) > 3,
        subplot_stem_too_large: () => cells.in_subplot === '1' && Number(cells.dbh_cm) >= 10,
        in_subplot_not_a_flag: () => !['0', '1', ''].includes(cells.in_subplot),
      };
      expect(Object.keys(broken).sort()).toEqual(BAD_ROW_KINDS.map((k) => k.kind).sort());
      expect([r.kind, broken[r.kind]()]).toEqual([r.kind, true]);
    }
  });
});

describe('planBadRows', () => {
  it('spreads the rows over the run and plans nothing for zero rows', () => {
    expect(planBadRows(0, 100, new Rng(1)).size).toBe(0);
    const plan = planBadRows(10, 1000, new Rng(1));
    const plots = [...plan.keys()].sort((a, b) => a - b);
    expect(plots).toHaveLength(10);
    expect(plots[0]).toBeLessThan(100);
    expect(plots.at(-1)).toBeGreaterThanOrEqual(900);
    expect(() => planBadRows(-1, 10, new Rng(1))).toThrow(/planBadRows/);
  });
});
