import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildServer, createProcessors as reportProcessors, listRegionExportRows } from '@stemwise/report';
import { InProcessQueue } from '@stemwise/platform';
import { fixtureSpecies, generateInventory, loadInventory, loadSpecies, remeasure } from '../compute/fixtures';
import { recomputeInProcess } from '../compute/support';
import { testLogger, useServices, type TestServices } from '../support/services';
import { createToken } from './tokens';

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

  it('keeps gains minus losses equal to the net change in every region and national estimate (the estimator is linear; same plots, same weights)', async () => {
    const rows = await listRegionExportRows(s.db);
    const at = (region: string, forestType: string, variable: string) => rows.find((r) => r.region === region && r.forest_type === forestType && r.variable === variable);
    const cells = new Set(rows.filter((r) => r.variable === 'agb_net_change_mg_ha_yr' && r.mean !== null).map((r) => `${r.region}\t${r.forest_type}`));
    expect(cells.size).toBeGreaterThan(10);
    for (const cell of cells) {
      const [region, forestType] = cell.split('\t');
      const mean = (v: string) => at(region, forestType, v)!.mean as number;
      const parts = mean('agb_growth_mg_ha_yr') + mean('agb_recruitment_mg_ha_yr') - mean('agb_died_mg_ha_yr') - mean('agb_removed_mg_ha_yr');
      expect(parts, cell).toBeCloseTo(mean('agb_net_change_mg_ha_yr'), 9);
      expect(mean('agb_died_mg_ha_yr') + mean('agb_removed_mg_ha_yr'), cell).toBeCloseTo(mean('agb_loss_mg_ha_yr'), 9);
    }
  });

  it('estimates mortality, recruitment, growth and carbon change for each region and nationally', async () => {
    const rows = await listRegionExportRows(s.db);
    for (const variable of ['carbon_net_change_mg_ha_yr', 'agb_growth_mg_ha_yr', 'agb_recruitment_mg_ha_yr', 'agb_loss_mg_ha_yr', 'agb_died_mg_ha_yr', 'agb_removed_mg_ha_yr', 'mortality_annual', 'recruitment_annual', 'dbh_increment_cm_yr']) {
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
  it('serves each region\'s and the national estimates of change with their pairs of visits, units and wording; the pages draw them', async () => {
    const app = await buildServer({ config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) }, { summaryCheckMs: 0 });
    try {
      const auth = { authorization: `Bearer ${(await createToken(s.db, 'admin')).token}` };
      const rows = await listRegionExportRows(s.db);
      for (const region of ['Sallowfen', 'Harrowmere', 'national']) {
        const url = region === 'national' ? '/v1/national/change' : `/v1/regions/${region}/change`;
        const res = await app.inject({ url, headers: auth });
        expect(res.statusCode, res.body.slice(0, 200)).toBe(200);
        const view = res.json() as {
          region: string;
          coverage: { n_plots_with_pair: number; n_plots: number; first_visit: string; last_visit: string; interval_years: { min: number; max: number }; by_forest_type: Array<{ forest_type: string; n_plots_with_pair: number }> };
          variables: Array<{ variable: string; unit: string }>;
          estimates: Array<{ forest_type: string; variable: string; mean: number | null }>;
          net_carbon_change: string;
        };
        expect(view.region).toBe(region);
        // The pairs, computed here from the stored rows: each plot's latest visit and the visit before it.
        const [pairs] = await s.db.query<{ n: number; plots: number; first: string; last: string; ymin: number; ymax: number }>(
          `with latest as (select distinct on (v.plot_id) v.id, v.plot_id from plot_visits v order by v.plot_id, v.survey_date desc)
           select count(c.plot_id)::int n, count(*)::int plots, min(a.survey_date)::text first, max(b.survey_date) filter (where c.plot_id is not null)::text last, min(c.years) ymin, max(c.years) ymax
             from latest l join plots p on p.id = l.plot_id join regions r on r.id = p.region_id
             left join plot_change c on c.visit_to_id = l.id left join plot_visits a on a.id = c.visit_from_id left join plot_visits b on b.id = c.visit_to_id
            where $1::text = 'national' or r.name = $1`,
          [region],
        );
        expect(view.coverage).toMatchObject({ n_plots_with_pair: pairs.n, n_plots: pairs.plots, first_visit: pairs.first, last_visit: pairs.last });
        expect(view.coverage.interval_years.min).toBeCloseTo(Number(pairs.ymin), 12);
        expect(view.coverage.interval_years.max).toBeCloseTo(Number(pairs.ymax), 12);
        if (region === 'Sallowfen') expect(view.coverage.by_forest_type.find((t) => t.forest_type === 'dry')?.n_plots_with_pair).toBe(0);
        // The estimates are the summary's rows on change, nothing else.
        const expected = rows.filter((r) => r.region === region && view.variables.some((v) => v.variable === r.variable));
        expect(view.estimates).toEqual(expected.map((r) => ({ ...r })));
        expect(view.variables.find((v) => v.variable === 'carbon_net_change_mg_ha_yr')?.unit).toBe('Mg C/ha/yr');
        expect(view.variables.find((v) => v.variable === 'mortality_annual')?.unit).toMatch(/^fraction per year/);
        expect(view.net_carbon_change).toMatch(/Mg C per hectare per year/);
      }
      for (const url of ['/regions/Harrowmere', '/national']) {
        const page = (await app.inject({ url, headers: auth })).body;
        expect(page).toContain('id="change-chart"');
        expect(page).toMatch(/<figure id="change-chart"><svg[^>]* width="640"/);
        expect(page).toContain('Net carbon change between visits');
        expect(page).toMatch(/id="change-coverage">From the \d+ of \d+ plots measured twice/);
        // mortality shown in percent per year in its table, not as a fraction
        expect(page).toMatch(/Annual mortality \(share of trees dying per year\) <span class="muted">\(% per year\)<\/span>/);
      }
    } finally {
      await app.close();
    }
  });
});
