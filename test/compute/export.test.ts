import { PLOT_METRICS } from '@stemwise/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateInventory, fixtureSpecies, loadInventory, loadSpecies } from './fixtures';
import { plotsText, recomputeInProcess } from './support';
import { useServices, type TestServices } from '../support/services';

// The `export plots` columns of version 1 exactly as in docs/exports.md (copied here on purpose: the
// test must fail if the code's list drifts from the contract), then the columns appended since: the
// metrics the catalogue lists after them (a column is added at the end, never renamed or moved).
const SPEC_COLUMNS_V1 =
  'plot_id, survey_date, region, forest_type, stems_ha, basal_area_m2_ha, qmd_cm, agb_mg_ha, carbon_mg_ha, n_identified, richness, shannon, simpson, inv_simpson, pielou, fisher_alpha, rarefied_50, chao1, pioneer_ba_share, light_demander_ba_share, shade_tolerant_ba_share, unassigned_ba_share, logging_removed_ba_frac, logging_score, fire_score, disturbance_index'.split(
    ', ',
  );
const SPEC_COLUMNS = [...SPEC_COLUMNS_V1, ...PLOT_METRICS.slice(SPEC_COLUMNS_V1.length - 4).map((m) => m.column)];

describe('export plots', () => {
  let s: TestServices;
  const inventory = generateInventory({ seed: 3, plotsPerCell: 3, stemsPerPlot: 45 });
  // Region names a spreadsheet would run as formulas.
  inventory[0].region = '=HYPERLINK("x")';
  inventory[1].region = '-North, upper';
  const nVisits = inventory.reduce((a, p) => a + p.visits.length, 0);

  beforeAll(async () => {
    s = await useServices({ STEMWISE_BOOTSTRAP: '50' });
    await loadSpecies(s.db, fixtureSpecies());
    await loadInventory(s.db, inventory);
    const { failures } = await recomputeInProcess(s.config, s.db);
    expect(failures).toEqual([]);
  });
  afterAll(async () => s?.cleanup());

  it('writes a CSV whose header is exactly the spec columns, one row per plot visit', async () => {
    const csv = await plotsText(s.db, 'csv');
    const lines = csv.split('\n');
    expect(lines[0]).toBe(SPEC_COLUMNS.join(','));
    expect(lines.at(-1)).toBe('');
    expect(lines.length - 2).toBe(nVisits);
  });

  it('neutralises text cells only: formulas get an apostrophe, numbers stay numbers', async () => {
    const csv = await plotsText(s.db, 'csv');
    expect(csv).toContain(`,"'=HYPERLINK(""x"")",`);
    expect(csv).toContain(`,"'-North, upper",`);
    for (const line of csv.trim().split('\n').slice(1)) {
      const cells = line.replace(/"[^"]*(""[^"]*)*"/g, 'Q').split(',');
      expect(cells).toHaveLength(SPEC_COLUMNS.length);
      for (const cell of cells.slice(4)) expect(cell === '' || String(Number(cell)) === cell, cell).toBe(true);
    }
  });

  it('writes JSON objects with the spec keys in order and null for what cannot be computed', async () => {
    const rows = JSON.parse(await plotsText(s.db, 'json')) as Array<Record<string, unknown>>;
    expect(rows).toHaveLength(nVisits);
    for (const r of rows) expect(Object.keys(r)).toEqual(SPEC_COLUMNS);
    // rarefied_50 is empty below 50 identified stems (docs/exports.md)
    const small = rows.filter((r) => (r.n_identified as number) < 50);
    expect(small.length).toBeGreaterThan(0);
    for (const r of small) expect(r.rarefied_50).toBeNull();
    const stumpsOnly = rows.find((r) => r.plot_id === 'P0007')!;
    expect(stumpsOnly.stems_ha).toBe(0);
    expect(stumpsOnly.fisher_alpha).toBeNull();
    expect(stumpsOnly.logging_removed_ba_frac).toBe(1);
  });

  it('writes GeoJSON (RFC 7946) with [longitude, latitude] points and the columns as properties', async () => {
    const gj = JSON.parse(await plotsText(s.db, 'geojson'));
    expect(gj.type).toBe('FeatureCollection');
    expect(gj.features).toHaveLength(nVisits);
    const byKey = new Map(inventory.map((p) => [p.plotKey, p]));
    for (const f of gj.features) {
      const plot = byKey.get(f.properties.plot_id)!;
      expect(f.type).toBe('Feature');
      expect(f.geometry).toEqual({ type: 'Point', coordinates: [plot.longitude, plot.latitude] });
      expect(Object.keys(f.properties)).toEqual(SPEC_COLUMNS);
    }
  });

  it('reads page by page with the same result, and filters by region', async () => {
    expect(await plotsText(s.db, 'csv', undefined, 4)).toBe(await plotsText(s.db, 'csv'));
    const region = 'Sallowfen';
    const lines = (await plotsText(s.db, 'csv', region)).trim().split('\n').slice(1);
    const expected = inventory.filter((p) => p.region === region).reduce((a, p) => a + p.visits.length, 0);
    expect(lines).toHaveLength(expected);
    for (const l of lines) expect(l.split(',')[2]).toBe(region);
    await expect(plotsText(s.db, 'csv', 'Atlantis')).rejects.toThrow(/no region named 'Atlantis' \(known: .*Sallowfen/);
  });

  it('orders rows by plot then survey date', async () => {
    const keys = (await plotsText(s.db, 'csv')).trim().split('\n').slice(1).map((l) => l.split(',').slice(0, 2).join(' '));
    expect(keys).toEqual([...keys].sort());
  });
});
