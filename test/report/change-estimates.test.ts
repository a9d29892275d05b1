import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createProcessors as reportProcessors, listRegionExportRows } from '@stemwise/report';
import { fixtureSpecies, generateInventory, loadInventory, loadSpecies, remeasure } from '../compute/fixtures';
import { recomputeInProcess } from '../compute/support';
import { useServices, type TestServices } from '../support/services';

// Region and national estimates of change between visits: the per-plot change of each plot's latest
// pair of visits, estimated like every other variable (docs/methods.md#stratified-estimator) over the
// plots that have one; a region × forest type mean is the plain mean of its plots' stored values.
describe('region and national estimates of change', () => {
  let s: TestServices;
  // Every plot measured once; then all but the plots of one forest type in one region measured again.
  const base = generateInventory({ seed: 31, plotsPerCell: 3, stemsPerPlot: 30 }).map((p) => ({ ...p, visits: [p.visits[0]] }));
  const inventory = base.map((p) => (p.region === 'Sallowfen' && p.forestType === 'dry' ? p : remeasure([p], { seed: 3 })[0]));

  beforeAll(async () => {
    s = await useServices();
    await loadSpecies(s.db, fixtureSpecies());
    await loadInventory(s.db, inventory);
    const { failures } = await recomputeInProcess(s.config, s.db, false, reportProcessors);
    expect(failures).toEqual([]);
  });
  afterAll(async () => s?.cleanup());

  it('gives each region × forest type the plain mean and count of its plots\' stored changes, with no total (not a per-hectare stock)', async () => {
    const rows = await listRegionExportRows(s.db);
    const stored = await s.db.query<{ region: string; forest_type: string; n: number; mean: number }>(
      `select r.name region, p.forest_type, count(*)::int n, avg(c.carbon_net_change_mg_ha_yr) mean
         from plot_change c join plots p on p.id = c.plot_id join regions r on r.id = p.region_id group by 1, 2`,
    );
    expect(stored.length).toBe(8); // 3 regions × 3 forest types, less the one cell measured once
    for (const cell of stored) {
      const row = rows.find((r) => r.region === cell.region && r.forest_type === cell.forest_type && r.variable === 'carbon_net_change_mg_ha_yr')!;
      expect(row.n_plots).toBe(cell.n);
      expect(row.mean).toBeCloseTo(Number(cell.mean), 10);
      expect(row.total).toBeNull();
    }
    // The cell without a second visit has no plots with change: no mean, never 0.
    const none = rows.find((r) => r.region === 'Sallowfen' && r.forest_type === 'dry' && r.variable === 'carbon_net_change_mg_ha_yr')!;
    expect(none.n_plots).toBe(0);
    expect(none.mean).toBeNull();
  });

  it('estimates mortality, recruitment, growth and carbon change for each region and nationally', async () => {
    const rows = await listRegionExportRows(s.db);
    for (const variable of ['carbon_net_change_mg_ha_yr', 'agb_growth_mg_ha_yr', 'agb_recruitment_mg_ha_yr', 'agb_loss_mg_ha_yr', 'mortality_annual', 'recruitment_annual', 'dbh_increment_cm_yr']) {
      for (const region of ['Harrowmere', 'Kestrel Downs', 'national']) {
        const row = rows.find((r) => r.region === region && r.forest_type === 'all' && r.variable === variable);
        expect(row, `${region} ${variable}`).toBeDefined();
        expect(row!.mean).not.toBeNull();
        expect(row!.se).not.toBeNull();
      }
    }
    const national = rows.find((r) => r.region === 'national' && r.forest_type === 'all' && r.variable === 'mortality_annual')!;
    // n counts the plots with a value: a plot with no live tree at its first visit has no mortality (the plot of stumps only).
    const [{ n }] = await s.db.query<{ n: number }>(`select count(*)::int n from plot_change where mortality_annual is not null`);
    expect(n).toBe(inventory.filter((p) => p.visits.length === 2).length - 1);
    expect(national.n_plots).toBe(n);
  });
});
