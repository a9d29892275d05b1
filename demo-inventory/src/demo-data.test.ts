import { mkdtemp, readFile, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateInventory } from './generate';
import { DEMO_DATA_COMMAND, DEMO_DATA_DIR, DEMO_DATA_FILES, DEMO_DATA_OPTIONS } from './index';

let dir: string;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'demo-inventory-data-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('the committed demo set', () => {
  it('is in demo-inventory/data, gzip-compressed, under 5 MB in all (both visits)', async () => {
    expect(DEMO_DATA_DIR).toMatch(/demo-inventory[\\/]data[\\/]?$/);
    let total = 0;
    for (const file of Object.values(DEMO_DATA_FILES)) total += (await stat(file)).size;
    expect(total).toBeLessThan(5 * 1024 * 1024);
    expect(DEMO_DATA_FILES.trees.endsWith('trees.csv.gz')).toBe(true);
  });

  it('has 150 plots of each forest type and no bad rows', async () => {
    const truth = JSON.parse(await readFile(DEMO_DATA_FILES.truth, 'utf8'));
    expect(truth.counts.plots_by_forest_type).toEqual({ wet: 150, moist: 150, dry: 150 });
    expect(truth.bad_rows).toEqual([]);
    expect(truth.seed).toBe(DEMO_DATA_OPTIONS.seed);
    expect(truth.options).toEqual({
      plots: DEMO_DATA_OPTIONS.plots, gzip: true, heights_fraction: DEMO_DATA_OPTIONS.heightsFraction, bad_rows: 0,
    });
  });

  it('is exactly what the documented command makes today (regenerated and compared)', async () => {
    expect(DEMO_DATA_COMMAND).toContain(`--plots ${DEMO_DATA_OPTIONS.plots} --seed ${DEMO_DATA_OPTIONS.seed}`);
    const fresh = await generateInventory({ outDir: dir, ...DEMO_DATA_OPTIONS });
    for (const k of ['plots', 'trees', 'strata', 'species', 'secondVisitPlots', 'secondVisitTrees'] as const) {
      const committed = gunzipSync(await readFile(DEMO_DATA_FILES[k]));
      const regenerated = gunzipSync(await readFile(fresh.files[k]));
      expect([k, committed.equals(regenerated)]).toEqual([k, true]);
    }
    const committedTruth = JSON.parse(await readFile(DEMO_DATA_FILES.truth, 'utf8'));
    expect(fresh.truth).toEqual(committedTruth);
  }, 240_000);
});
