import { mkdtemp, readFile, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateInventory, type GenerateProgress, type GenerateResult } from './generate';
import { COUNTRY, REGIONS } from './scenario';

type Row = Record<string, string>;
const csv = (text: string): Row[] => parse(text, { columns: true, skip_empty_lines: true }) as Row[];

let dir: string;
let plain: GenerateResult;
let plots: Row[];
let trees: Row[];
const progress: GenerateProgress[] = [];

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'demo-inventory-gen-'));
  plain = await generateInventory({ outDir: join(dir, 'plain'), plots: 36, seed: 11, heightsFraction: 0.5, onProgress: (p) => progress.push(p) });
  plots = csv(await readFile(plain.files.plots, 'utf8'));
  trees = csv(await readFile(plain.files.trees, 'utf8'));
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('generateInventory: the files follow the inventory batch format, version 1', () => {
  it('writes the spec columns as headers', async () => {
    const head = async (f: string) => (await readFile(f, 'utf8')).split('\n')[0];
    expect(await head(plain.files.plots)).toBe(
      'plot_id,region,forest_type,latitude,longitude,area_ha,dbh_min_cm,subplot_area_ha,subplot_dbh_min_cm,survey_date,logging_class,fire_class,elevation_m',
    );
    expect(await head(plain.files.trees)).toBe('plot_id,tree_id,species,dbh_cm,height_m,status,stump_cause,fire_damage,in_subplot');
    expect(await head(plain.files.strata)).toBe('region,forest_type,forest_area_ha');
    expect(await head(plain.files.species)).toBe('name,family,guild,wood_density,synonyms');
  });

  it('writes valid plot rows inside the invented country', () => {
    expect(plots).toHaveLength(36);
    expect(new Set(plots.map((p) => p.plot_id)).size).toBe(36);
    const regionNames = REGIONS.map((r) => r.name);
    for (const p of plots) {
      expect(p.plot_id).toMatch(/^[A-Za-z0-9_.-]{1,64}$/);
      expect(regionNames).toContain(p.region);
      expect(['wet', 'moist', 'dry']).toContain(p.forest_type);
      expect(Number(p.latitude)).toBeGreaterThanOrEqual(COUNTRY.latMin);
      expect(Number(p.latitude)).toBeLessThanOrEqual(COUNTRY.latMax);
      expect(Number(p.longitude)).toBeGreaterThanOrEqual(COUNTRY.lonMin);
      expect(Number(p.longitude)).toBeLessThanOrEqual(COUNTRY.lonMax);
      expect(['1', '0.5']).toContain(p.area_ha);
      expect(Number(p.subplot_area_ha)).toBeLessThan(Number(p.area_ha));
      expect(p.dbh_min_cm).toBe('10');
      expect(p.survey_date).toMatch(/^20(1[3-9])-\d\d-\d\d$/); // first visits 2013-2019 (second visits in second-visit/)
      expect(Number.isNaN(Date.parse(p.survey_date))).toBe(false);
      for (const c of [p.logging_class, p.fire_class]) expect(['0', '1', '2', '3']).toContain(c);
    }
    expect(plots.filter((p) => p.forest_type === 'wet')).toHaveLength(12);
  });

  it('writes valid stem rows: known plot, unique tag, status and stump cause, sizes and flags in range', () => {
    const byPlot = new Map(plots.map((p) => [p.plot_id, p]));
    const tags = new Set<string>();
    const problems: string[] = [];
    const check = (ok: boolean, t: Row, what: string) => {
      if (!ok) problems.push(`${t.plot_id}/${t.tree_id}: ${what}`);
    };
    for (const t of trees) {
      const p = byPlot.get(t.plot_id);
      check(p !== undefined, t, 'unknown plot');
      const key = `${t.plot_id}/${t.tree_id}`;
      check(!tags.has(key), t, 'duplicate tag');
      tags.add(key);
      check(['live', 'dead', 'stump'].includes(t.status), t, 'status');
      check(t.status === 'stump' ? ['logged', 'natural', 'unknown'].includes(t.stump_cause) : t.stump_cause === '', t, 'stump_cause');
      const dbh = Number(t.dbh_cm);
      check(dbh > 0 && dbh <= 500, t, 'dbh range');
      if (t.in_subplot === '1') {
        check(dbh < Number(p?.dbh_min_cm) && dbh >= Number(p?.subplot_dbh_min_cm), t, 'subplot dbh');
        check(Number(p?.subplot_area_ha) > 0, t, 'subplot stem without subplot');
      } else {
        check(t.in_subplot === '0' && dbh >= 10, t, 'main-plot dbh or flag');
      }
      if (t.height_m !== '') check(Number(t.height_m) > 1.3 && Number(t.height_m) <= 55, t, 'height');
      check(['0', '1', '2', '3'].includes(t.fire_damage), t, 'fire_damage');
    }
    expect(problems).toEqual([]);
    expect(trees.length).toBe(plain.truth.counts.stems.rows);
  });

  it('looks like tropical forest: 300–700 live stems/ha ≥ 10 cm and 15–45 m²/ha basal area on average (plausibility bounds, docs/methods.md#plausibility-warnings, memory)', () => {
    const area = new Map(plots.map((p) => [p.plot_id, Number(p.area_ha)]));
    const stems = new Map<string, number>();
    const ba = new Map<string, number>();
    for (const t of trees) {
      if (t.status !== 'live' || t.in_subplot === '1') continue;
      stems.set(t.plot_id, (stems.get(t.plot_id) ?? 0) + 1 / area.get(t.plot_id)!);
      ba.set(t.plot_id, (ba.get(t.plot_id) ?? 0) + (Math.PI * (Number(t.dbh_cm) / 200) ** 2) / area.get(t.plot_id)!);
    }
    const mean = (m: Map<string, number>) => [...m.values()].reduce((a, b) => a + b, 0) / m.size;
    expect(mean(stems)).toBeGreaterThan(300);
    expect(mean(stems)).toBeLessThan(700);
    expect(mean(ba)).toBeGreaterThan(15);
    expect(mean(ba)).toBeLessThan(45);
  });

  it('has dead stems, the three stump causes, fire damage and heights on about the asked share of plots', () => {
    const has = (f: (t: Row) => boolean) => trees.some(f);
    expect(has((t) => t.status === 'dead')).toBe(true);
    for (const cause of ['logged', 'natural', 'unknown']) expect(has((t) => t.stump_cause === cause)).toBe(true);
    for (const level of ['1', '2', '3']) expect(has((t) => t.fire_damage === level)).toBe(true);
    const plotsWithHeights = new Set(trees.filter((t) => t.height_m !== '').map((t) => t.plot_id)).size;
    expect(plotsWithHeights).toBe(plain.truth.counts.plots_with_heights);
    expect(plotsWithHeights).toBeGreaterThan(8);
    expect(plotsWithHeights).toBeLessThan(28);
  });

  it('writes the names crews write: accepted names, synonyms, names not on the list and unidentified forms', async () => {
    const species = csv(await readFile(plain.files.species, 'utf8'));
    const accepted = new Set(species.map((s) => s.name));
    const synonyms = new Set(species.flatMap((s) => s.synonyms.split(';').filter(Boolean)));
    const names = trees.map((t) => t.species);
    expect(names.some((n) => accepted.has(n))).toBe(true);
    expect(names.some((n) => synonyms.has(n))).toBe(true);
    expect(names.some((n) => n === '' || n === 'indet' || n === 'unknown' || n.endsWith(' sp.'))).toBe(true);
    const unlisted = names.filter((n) => /^[A-Z][a-z]+ [a-z]+$/.test(n) && !accepted.has(n) && !synonyms.has(n));
    expect(unlisted.length).toBeGreaterThan(0);
    expect(unlisted.length).toBe(plain.truth.counts.stems.written_unlisted);
  });

  it('gives every plot’s region × forest type a stratum with forest area', async () => {
    const strata = csv(await readFile(plain.files.strata, 'utf8'));
    const keys = new Set(strata.map((s) => `${s.region}/${s.forest_type}`));
    for (const s of strata) expect(Number(s.forest_area_ha)).toBeGreaterThan(0);
    for (const p of plots) expect(keys.has(`${p.region}/${p.forest_type}`)).toBe(true);
  });
});

describe('generateInventory: runs', () => {
  it('writes the same bytes for the same seed and other data for another seed', async () => {
    const again = await generateInventory({ outDir: join(dir, 'again'), plots: 36, seed: 11, heightsFraction: 0.5 });
    const other = await generateInventory({ outDir: join(dir, 'other'), plots: 36, seed: 12, heightsFraction: 0.5 });
    for (const k of ['plots', 'trees', 'strata', 'species'] as const) {
      expect((await readFile(again.files[k])).equals(await readFile(plain.files[k]))).toBe(true);
    }
    expect((await readFile(other.files.trees)).equals(await readFile(plain.files.trees))).toBe(false);
  });

  it('writes gzip files whose content is exactly the plain files', async () => {
    const zipped = await generateInventory({ outDir: join(dir, 'gz'), plots: 36, seed: 11, heightsFraction: 0.5, gzip: true });
    expect(zipped.files.trees.endsWith('trees.csv.gz')).toBe(true);
    for (const k of ['plots', 'trees', 'strata', 'species'] as const) {
      const unzipped = gunzipSync(await readFile(zipped.files[k]));
      expect(unzipped.equals(await readFile(plain.files[k]))).toBe(true);
    }
    expect((await stat(zipped.files.trees)).size).toBeLessThan((await stat(plain.files.trees)).size / 3);
  });

  it('makes each plot independent of how many plots the run has', async () => {
    const fewer = await generateInventory({ outDir: join(dir, 'fewer'), plots: 10, seed: 11, heightsFraction: 0.5 });
    const first10 = csv(await readFile(fewer.files.trees, 'utf8'));
    const ids = new Set(plots.slice(0, 10).map((p) => p.plot_id));
    expect(first10).toEqual(trees.filter((t) => ids.has(t.plot_id)));
  });

  it('reports progress up to the last plot with a growing stem count', () => {
    expect(progress.at(-1)).toEqual({ plotsDone: 36, plotsTotal: 36, stemsWritten: trees.length + plain.truth.change.second_visits.stem_rows });
    for (let i = 1; i < progress.length; i++) {
      expect(progress[i].plotsDone).toBeGreaterThan(progress[i - 1].plotsDone);
      expect(progress[i].stemsWritten).toBeGreaterThanOrEqual(progress[i - 1].stemsWritten);
    }
  });

  it('keeps truth.json small and records the seed, sizes and planted curves', async () => {
    const text = await readFile(plain.files.truth, 'utf8');
    expect(text.length).toBeLessThan(20_000);
    const truth = JSON.parse(text);
    expect(truth.seed).toBe(11);
    expect(truth.counts.plots).toBe(36);
    expect(truth.planted.by_forest_type.wet).toMatchObject({ shape: 'hump', vertex: 0.45 });
    expect(truth.planted.by_forest_type.moist.shape).toBe('decreasing');
    expect(truth.planted.by_forest_type.dry.shape).toBe('none');
    expect(truth.bad_rows).toEqual([]);
  });

  it('rejects bad options with an error naming generateInventory, writing nothing', async () => {
    await expect(generateInventory({ outDir: join(dir, 'x'), plots: 0 })).rejects.toThrow(/generateInventory: plots/);
    await expect(generateInventory({ outDir: join(dir, 'x'), heightsFraction: 1.5 })).rejects.toThrow(/generateInventory: heightsFraction/);
    await expect(generateInventory({ outDir: join(dir, 'x'), seed: 1.5 })).rejects.toThrow(/generateInventory: seed/);
    await expect(generateInventory({ outDir: '' })).rejects.toThrow(/generateInventory: outDir/);
    await expect(stat(join(dir, 'x'))).rejects.toThrow();
  });
});

describe('generateInventory: the second visit (second-visit/, a batch of its own)', () => {
  it('re-measures most plots 4 to 6 years later, never after today, with the same plot rows otherwise', async () => {
    const later = csv(await readFile(plain.files.secondVisitPlots, 'utf8'));
    const first = new Map(plots.map((p) => [p.plot_id, p]));
    expect(later.length).toBeGreaterThan(0.6 * plots.length);
    expect(later.length).toBeLessThan(plots.length);
    const today = new Date().toISOString().slice(0, 10);
    for (const p of later) {
      const f = first.get(p.plot_id)!;
      const years = (Date.parse(p.survey_date) - Date.parse(f.survey_date)) / 86_400_000 / 365.25;
      expect(years).toBeGreaterThanOrEqual(4 - 1 / 365);
      expect(years).toBeLessThanOrEqual(6 + 1 / 365);
      expect(p.survey_date <= today).toBe(true);
      expect({ ...p, survey_date: '' }).toEqual({ ...f, survey_date: '' });
    }
  });

  it('keeps every tag: no dead tree or stump comes back to life, survivors never shrink by more than 0.5 cm, recruits get new tags', async () => {
    const later = csv(await readFile(plain.files.secondVisitTrees, 'utf8'));
    const before = new Map(trees.map((t) => [`${t.plot_id}/${t.tree_id}`, t]));
    const seen = new Set<string>();
    let recruits = 0;
    let logged = 0;
    for (const t of later) {
      const key = `${t.plot_id}/${t.tree_id}`;
      expect(seen.has(key)).toBe(false);
      seen.add(key);
      const b = before.get(key);
      if (b === undefined) {
        expect(t.status).toBe('live');
        if (t.in_subplot === '0') recruits += 1;
        continue;
      }
      if (b.status !== 'live') expect([t.status, t.stump_cause]).toEqual([b.status, b.stump_cause]);
      if (b.status === 'live' && t.status === 'live') expect(Number(t.dbh_cm)).toBeGreaterThanOrEqual(Number(b.dbh_cm) - 0.5);
      if (b.status === 'live' && t.status === 'stump') {
        expect(t.stump_cause).toBe('logged');
        expect(Number(b.dbh_cm)).toBeGreaterThanOrEqual(30);
        logged += 1;
      }
      if (t.in_subplot === '1') expect(Number(t.dbh_cm)).toBeLessThan(10);
    }
    const v = plain.truth.change.second_visits;
    expect(recruits).toBe(v.recruits);
    expect(logged).toBe(v.logged);
    expect(v.died_fallen_absent).toBeGreaterThan(0);
    expect(v.died_fallen_absent).toBeLessThan(0.3 * (v.died_fallen_absent + v.died_standing));
  });
});
