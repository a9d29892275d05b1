import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { markStale } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { createProcessors, exportRegions, writeRegionPages } from '@stemwise/report';
import { exportCommand, Runtime } from '@stemwise/cli';
import { envFor, testLogger, useServices, type TestServices } from '../support/services';
import { jobContext, seedRun } from './fixture';
import { seedScenario } from './seed-scenario';

const COLUMNS = 'region,forest_type,variable,n_plots,mean,se,ci_low,ci_high,sampling_error_pct,forest_area_ha,total';
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
    expect(new Set(lines.slice(1).map((l) => l.split(',')[0]))).toEqual(new Set(['Northvale', 'Southmere'])); // Ostmark has no summary
    // mean 21 and SE √3.25 (computed by hand, see summaries.test.ts) in shortest round-trip form
    expect(lines.filter((l) => l.startsWith('Northvale,all,basal_area_m2_ha,5,21,1.8027756377319946,'))).toHaveLength(1);

    const jsonFile = path.join(out, 'southmere.json');
    const one = await exportRegions(deps, { format: 'json', region: 'Southmere' }, { file: jsonFile });
    const rows = JSON.parse(fs.readFileSync(jsonFile, 'utf8')) as Array<Record<string, unknown>>;
    expect(rows).toHaveLength(one.rows);
    expect(Object.keys(rows[0]).join(',')).toBe(COLUMNS);
    expect(rows.every((r) => r.region === 'Southmere')).toBe(true);
    expect(rows.find((r) => r.forest_type === 'all' && r.variable === 'basal_area_m2_ha')).toMatchObject({ mean: 14, total: null, forest_area_ha: null });
    await expect(exportRegions(deps, { format: 'csv', region: 'Atlantis' }, { file: path.join(out, 'x.csv') })).rejects.toThrow(/no region named 'Atlantis'/);
  });

  it('is what `stemwise export regions` writes', async () => {
    const file = path.join(out, 'cli.csv');
    const rt = new Runtime(envFor(s, { STEMWISE_LOG_LEVEL: 'silent' }));
    const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    try {
      expect(await exportCommand(['regions', '--region', 'Northvale', '--out', file], rt)).toBe(0);
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
  });
});
