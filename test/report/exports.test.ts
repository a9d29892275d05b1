import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { markStale } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { createProcessors, exportRegions, writeRegionPages } from '@stemwise/report';
import { exportCommand, runCommand, Runtime } from '@stemwise/cli';
import { envFor, testLogger, useServices, type TestServices } from '../support/services';
import { jobContext, seedRun } from './fixture';
import { seedScenario } from './seed-scenario';

const COLUMNS = 'region,forest_type,variable,n_plots,mean,se,ci_low,ci_high,sampling_error_pct,forest_area_ha,total,caution_flag';
let s: TestServices;
let deps: ServiceDeps;
const out = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-exports-'));

describe('export regions and the static report', () => {
  beforeAll(async () => {
    s = await useServices();
    deps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedScenario(s.db);
    await markStale(s.db, 'summary', ['Northvale', 'Southmere']);
    await createProcessors(deps)['report.summaries']!({ runId: await seedRun(s.db) }, jobContext(testLogger()));
  });
  afterAll(async () => {
    await s?.cleanup();
    fs.rmSync(out, { recursive: true, force: true });
  });

  it('writes the spec columns of the latest snapshots, every region or one, as CSV or JSON', async () => {
    const csvFile = path.join(out, 'regions.csv');
    const all = await exportRegions(deps, { format: 'csv' }, { file: csvFile });
    const lines = fs.readFileSync(csvFile, 'utf8').trimEnd().split('\n');
    expect(lines[0]).toBe(COLUMNS);
    expect(all.rows).toBe(lines.length - 1);
    const regionOf = lines.slice(1).map((l) => l.split(',')[0]);
    expect(new Set(regionOf)).toEqual(new Set(['Northvale', 'Southmere', 'national'])); // Ostmark has no summary
    // the national rows come last: `all` then each forest type, every default variable (13 of version 1,
    // the 5 carbon pools and the 4 at the reporting threshold: 22 × 4; seeded plots have no stand tables)
    const first = regionOf.indexOf('national');
    expect(regionOf.slice(first).every((r) => r === 'national')).toBe(true);
    expect(regionOf.length - first).toBe(22 * 4);
    // 12 plots of three regions with plot-count weights: ȳ = 18.5 (by hand, see summaries.test.ts), no total
    // 12 plots are fewer than the default 20: flagged few_plots (with the sampling error of 12 %, not above 20 %)
    expect(lines.filter((l) => /^national,all,basal_area_m2_ha,12,18\.5,[^,]+,[^,]+,[^,]+,[^,]+,,,few_plots$/.test(l))).toHaveLength(1);
    // mean 21 and SE √3.25 (computed by hand, see summaries.test.ts) in shortest round-trip form
    expect(lines.filter((l) => l.startsWith('Northvale,all,basal_area_m2_ha,5,21,1.8027756377319946,'))).toHaveLength(1);

    const jsonFile = path.join(out, 'southmere.json');
    const one = await exportRegions(deps, { format: 'json', region: 'Southmere' }, { file: jsonFile });
    const rows = JSON.parse(fs.readFileSync(jsonFile, 'utf8')) as Array<Record<string, unknown>>;
    expect(rows).toHaveLength(one.rows);
    expect(Object.keys(rows[0]).join(',')).toBe(COLUMNS);
    expect(rows.every((r) => r.region === 'Southmere')).toBe(true);
    expect(rows.find((r) => r.forest_type === 'all' && r.variable === 'basal_area_m2_ha')).toMatchObject({ mean: 14, total: null, forest_area_ha: null });
    const nationalFile = path.join(out, 'national.json');
    const nat = await exportRegions(deps, { format: 'json', region: 'national' }, { file: nationalFile });
    const natRows = JSON.parse(fs.readFileSync(nationalFile, 'utf8')) as Array<Record<string, unknown>>;
    expect(natRows).toHaveLength(nat.rows);
    expect(natRows.map((r) => `${r.region}/${r.forest_type}`).filter((k, i, a) => a.indexOf(k) === i)).toEqual(['national/all', 'national/dry', 'national/moist', 'national/wet']);
    await expect(exportRegions(deps, { format: 'csv', region: 'Atlantis' }, { file: path.join(out, 'x.csv') })).rejects.toThrow(/no region named 'Atlantis'/);
  });

  it('is what `stemwise export regions` writes', async () => {
    const file = path.join(out, 'cli.csv');
    const rt = new Runtime(envFor(s, { STEMWISE_LOG_LEVEL: 'silent' }));
    const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    try {
      expect(await runCommand('export', exportCommand, ['regions', '--region', 'Northvale', '--out', file], rt)).toBe(0);
    } finally {
      err.mockRestore();
      await rt.close();
    }
    const text = fs.readFileSync(file, 'utf8');
    expect(text.split('\n')[0]).toBe(COLUMNS);
    expect(text).toContain('\nNorthvale,all,carbon_mg_ha,5,94.5,');
  });

  it('writes the report folder: an index and, per summarised region, a page with its downloads beside it', async () => {
    const dir = path.join(out, 'report');
    const written = await writeRegionPages(deps, dir);
    expect(written.regions.map((r) => [r.region, r.version])).toEqual([
      ['Northvale', 1],
      ['Southmere', 1],
    ]);
    const index = fs.readFileSync(path.join(dir, 'index.html'), 'utf8');
    expect(index).toContain('href="regions/northvale.html"');
    expect(index).toMatch(/Ostmark<\/td>/); // listed without a link: no summary yet
    const page = fs.readFileSync(path.join(dir, 'regions', 'northvale.html'), 'utf8');
    for (const link of ['../index.html', 'northvale-summary.csv', 'northvale-summary.json', 'northvale-plots.geojson']) {
      expect(page).toContain(`href="${link}"`);
      expect(fs.existsSync(path.join(dir, 'regions', link))).toBe(true);
    }
    expect(page).not.toMatch(/<script/i);
    expect((page.match(/<svg/g) ?? []).length).toBeGreaterThanOrEqual(4);
    expect(page).toContain('licensed foresters');
    expect(fs.readFileSync(path.join(dir, 'regions', 'northvale-summary.csv'), 'utf8').split('\n')[0]).toBe(COLUMNS);
    expect(JSON.parse(fs.readFileSync(path.join(dir, 'regions', 'northvale-plots.geojson'), 'utf8')).features).toHaveLength(5);
    expect(page).toContain('Uses the latest visit of each plot, surveyed 2025–2026.');
    // the carbon pools: three covered with their estimates, three named as not covered, with the caution
    expect(page).toMatch(/<table id="pools">[^]*data-pool="tree_carbon_mg_ha"[^]*<td>Lying dead wood<\/td><td><strong>not covered<\/strong>[^]*<td>Litter<\/td>[^]*<td>Soil organic carbon<\/td>/);
    expect(page).toContain('National methods and the IPCC reporting rules decide which pools are reported');
  });

  it('writes the national page with its figures, the visits it uses and its downloads, linked from the index', async () => {
    const dir = path.join(out, 'report-national');
    const written = await writeRegionPages(deps, dir);
    expect(written.national).toBe(path.join(dir, 'national.html'));
    const index = fs.readFileSync(path.join(dir, 'index.html'), 'utf8');
    expect(index).toContain('href="national.html"');
    // rounded to the precision of the SE (two significant digits of an SE below 1 → two decimals): 18.50, trailing zero kept
    expect(index).toMatch(/<tr data-variable="reporting_basal_area_m2_ha"><td>Basal area from the reporting threshold[^]*?<td class="num">18\.50<\/td><td class="num">16\.28 – 20\.72<\/td>/);
    const page = fs.readFileSync(written.national!, 'utf8');
    expect(page).toContain('<h1>National figures</h1>');
    expect(page).toContain('Uses the latest visit of each plot, surveyed 2025–2026.');
    expect(page).toContain('All regions (stratified by region × forest type)');
    expect(page).toMatch(/<h2 id="carbon-pools">Carbon pools<\/h2>\s*<table id="pools">[^]*<td>Soil organic carbon<\/td><td><strong>not covered<\/strong>/);
    expect(page).toMatch(/<div class="card" data-variable="reporting_basal_area_m2_ha">[^]*?<div class="value">18\.50 [^]*?SE 0\.\d\d<\/div>/);
    // the JSON keeps full precision
    const rows = JSON.parse(fs.readFileSync(path.join(dir, 'national-summary.json'), 'utf8')).summary.rows as Array<{ forest_type: string; variable: string; mean: number }>;
    expect(rows.find((r) => r.forest_type === 'all' && r.variable === 'basal_area_m2_ha')?.mean).toBeCloseTo(18.5, 10);
    expect(page).toContain('licensed foresters');
    // every national figure rests on 12 plots: marked, with the legend naming the thresholds
    expect(page).toMatch(/<div class="n muted">12 plots<span class="flag" data-flag="few_plots">few plots<\/span><\/div>/);
    expect(page).toContain('from fewer than 20 plots');
    expect(page).toContain('a sampling error above 20 %');
    expect(page).not.toMatch(/<script/i);
    for (const link of ['index.html', 'national-summary.csv', 'national-summary.json']) {
      expect(page).toContain(`href="${link}"`);
      expect(fs.existsSync(path.join(dir, link))).toBe(true);
    }
    expect(fs.readFileSync(path.join(dir, 'national-summary.csv'), 'utf8').split('\n')[0]).toBe(COLUMNS);
  });
});
