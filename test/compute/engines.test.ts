import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fixtureSpecies, generateInventory, loadInventory, loadSpecies } from './fixtures';
import { changeText, fitsText, openPglite, plotsText, recomputeInProcess } from './support';
import { useServices, type TestServices } from '../support/services';

// The same generated inventory computed on PostgreSQL and on the embedded PGlite must give the same
// text, digit for digit, in every column of `export plots` and `export fits`.
describe('metrics and fits on PostgreSQL and PGlite', () => {
  let pg: TestServices;
  let lite: Awaited<ReturnType<typeof openPglite>>;
  const inventory = generateInventory({ seed: 11, plotsPerCell: 5, stemsPerPlot: 50 });

  beforeAll(async () => {
    [pg, lite] = await Promise.all([useServices({ STEMWISE_BOOTSTRAP: '200' }), openPglite({ STEMWISE_BOOTSTRAP: '200' })]);
    for (const { db } of [pg, lite]) {
      await loadSpecies(db, fixtureSpecies());
      await loadInventory(db, inventory);
    }
  });
  afterAll(async () => {
    await pg?.cleanup();
    await lite?.cleanup();
  });

  let computed = false;
  /** Both engines recomputed, as the first test leaves them: done here when a test runs without it (vitest -t). */
  async function recomputed(): Promise<void> {
    if (computed) return;
    for (const { config, db } of [pg, lite]) expect((await recomputeInProcess(config, db)).failures).toEqual([]);
    computed = true;
  }

  it('computes every visit on both engines without failures', async () => {
    for (const { config, db } of [pg, lite]) {
      const { plan, failures } = await recomputeInProcess(config, db);
      expect(failures).toEqual([]);
      expect(plan?.visits).toBe(inventory.reduce((a, p) => a + p.visits.length, 0));
      const [{ stale }] = await db.query<{ stale: number }>(`select count(*)::int stale from plot_visits where stale`);
      expect(stale).toBe(0);
      const [{ state }] = await db.query<{ state: string }>(`select state from recompute_runs where id = $1`, [plan!.runId]);
      expect(state).toBe('done');
    }
    computed = true;
  });

  it('exports identical plots text in every format', async () => {
    await recomputed();
    for (const format of ['csv', 'json', 'geojson'] as const) {
      const a = await plotsText(pg.db, format);
      const b = await plotsText(lite.db, format);
      expect(b).toBe(a);
    }
    const csv = await plotsText(pg.db);
    const lines = csv.trim().split('\n');
    expect(lines).toHaveLength(1 + inventory.reduce((a, p) => a + p.visits.length, 0));
    // every numeric column is filled somewhere (no column silently empty)
    const header = lines[0].split(',');
    const rows = lines.slice(1).map((l) => l.split(','));
    for (let c = 4; c < header.length; c++) expect(rows.some((r) => r[c] !== ''), header[c]).toBe(true);
  });

  it('exports identical change between visits on both engines, one row per plot measured twice', async () => {
    await recomputed();
    for (const format of ['csv', 'json', 'geojson'] as const) {
      const a = await changeText(pg.db, format);
      expect(await changeText(lite.db, format)).toBe(a);
    }
    expect((await changeText(pg.db, 'csv')).trim().split('\n')).toHaveLength(1 + inventory.filter((p) => p.visits.length === 2).length);
  });

  it('exports identical fits on both engines, two rows per forest type', async () => {
    await recomputed();
    const a = await fitsText(pg.config, pg.db);
    const b = await fitsText(lite.config, lite.db);
    expect(b).toBe(a);
    const lines = a.trim().split('\n');
    expect(lines).toHaveLength(1 + 3 * 2);
    const other = await fitsText(pg.config, pg.db, { axis: 'logging_score', metric: 'shannon' });
    expect(await fitsText(lite.config, lite.db, { axis: 'logging_score', metric: 'shannon' })).toBe(other);
  });

  it('stores the same height–diameter models on both engines', async () => {
    await recomputed();
    const q = `select forest_type, coefficients, stats from height_models order by forest_type`;
    const a = await pg.db.query(q);
    expect(a.length).toBeGreaterThan(0);
    expect(await lite.db.query(q)).toEqual(a);
  });
});
