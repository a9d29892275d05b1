import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { markStale } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { buildServer, createProcessors } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { jobContext, seedPlots, seedRun } from './fixture';
import { seedScenario } from './seed-scenario';
import { createToken } from './tokens';

// "What changed" between two versions of a region summary (docs/methods.md#what-changed-between-versions),
// the biomass method shares (docs/methods.md#biomass-method-shares) and the plot-size note
// (docs/methods.md#plots-of-different-sizes), end to end through the summaries job, the API and the page.

let s: TestServices;
let deps: ServiceDeps;
let app: FastifyInstance;
let auth: { authorization: string };

async function summaries(): Promise<void> {
  await createProcessors(deps)['report.summaries']!({ runId: await seedRun(s.db) }, jobContext(testLogger()));
}

const SHARES = (measured: number, species: number) => ({
  agb_height_measured_share: measured,
  agb_height_modelled_share: 0,
  agb_no_height_share: 1 - measured,
  agb_wd_species_share: species,
  agb_wd_genus_share: 0,
  agb_wd_family_share: 0,
  agb_wd_plot_share: 0,
  agb_wd_default_share: 1 - species,
});

describe('what changed since the previous summary version', () => {
  beforeAll(async () => {
    s = await useServices();
    deps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedScenario(s.db);
    await markStale(s.db, 'summary', ['Northvale']);
    await summaries();
    auth = { authorization: `Bearer ${(await createToken(s.db, 'admin')).token}` };
    app = await buildServer(deps, { summaryCheckMs: 0 });
  });
  afterAll(async () => {
    await app?.close();
    await s?.cleanup();
  });

  it('keeps the plot keys of each new version', async () => {
    const [v1] = await s.db.query<{ plot_keys: string[] }>(`select s.plot_keys from region_summaries s join regions r on r.id = s.region_id where r.name = 'Northvale' and s.version = 1`);
    expect(v1.plot_keys).toEqual(['NV-D1', 'NV-D2', 'NV-W1', 'NV-W2', 'NV-W3']);
  });

  it('says the first version is the first', async () => {
    const res = await app.inject({ url: '/v1/regions/Northvale/summary/changes', headers: auth });
    expect(res.statusCode).toBe(200);
    expect(res.json()).toEqual({ region: 'Northvale', version: 1, previous_version: null, plots_added: null, plots_removed: null, moved: [] });
    expect((await app.inject({ url: '/v1/regions/Northvale/summary/changes?version=7', headers: auth })).statusCode).toBe(404);
  });

  it('lists plots added and removed and the estimates that moved by more than their SE, with old value, new value and SE', async () => {
    // wet basal area was 20, 24, 28 (mean 24), dry 10, 14 (mean 12), W = 0.75, 0.25 (seed-scenario.ts).
    // Now: NV-W3 no longer computed (its metrics gone), NV-W4 new at 26, NV-W1 → 30, NV-W2 → 34:
    // wet 30, 34, 26 → mean 30, s² = 16, SE √(16/3); dry unchanged; all 0.75·30 + 0.25·12 = 25.5,
    // SE √(0.5625·16/3 + 0.0625·8/2) = √3.25 (Cochran 1977 ch. 5, computed by hand).
    await seedPlots(s.db, [{ key: 'NV-W4', region: 'Northvale', forestType: 'wet', metrics: { basal_area_m2_ha: 26, stems_ha: 550, agb_mg_ha: 300, carbon_mg_ha: 141, fisher_alpha: 11, disturbance_index: 0.3, ...SHARES(0.25, 0.5) } }]);
    await s.db.query(`delete from plot_metrics m using plot_visits v, plots p where m.visit_id = v.id and p.id = v.plot_id and p.plot_key = 'NV-W3'`);
    await s.db.query(`update plot_metrics m set basal_area_m2_ha = case p.plot_key when 'NV-W1' then 30 else 34 end from plot_visits v join plots p on p.id = v.plot_id where m.visit_id = v.id and p.plot_key in ('NV-W1', 'NV-W2')`);
    await s.db.query(`update plot_visits v set area_ha = 0.5 from plots p where p.id = v.plot_id and p.plot_key = 'NV-W1'`);
    await markStale(s.db, 'summary', ['Northvale']);
    await summaries();

    const res = await app.inject({ url: '/v1/regions/Northvale/summary/changes', headers: auth });
    expect(res.statusCode).toBe(200);
    const body = res.json() as { version: number; previous_version: number; plots_added: string[]; plots_removed: string[]; moved: Array<{ forest_type: string; variable: string; old_mean: number; new_mean: number; se: number }> };
    expect(body.version).toBe(2);
    expect(body.previous_version).toBe(1);
    expect(body.plots_added).toEqual(['NV-W4']);
    expect(body.plots_removed).toEqual(['NV-W3']);
    const moved = (t: string) => body.moved.find((m) => m.forest_type === t && m.variable === 'basal_area_m2_ha');
    expect(moved('wet')!.old_mean).toBeCloseTo(24, 12);
    expect(moved('wet')!.new_mean).toBeCloseTo(30, 12);
    expect(moved('wet')!.se).toBeCloseTo(Math.sqrt(16 / 3), 12);
    expect(moved('all')!.old_mean).toBeCloseTo(21, 12);
    expect(moved('all')!.new_mean).toBeCloseTo(25.5, 12);
    expect(moved('all')!.se).toBeCloseTo(Math.sqrt(3.25), 12);
    expect(moved('dry')).toBeUndefined(); // unchanged
    // the earlier version's changes stay what they were
    expect((await app.inject({ url: '/v1/regions/Northvale/summary/changes?version=1', headers: auth })).json()).toMatchObject({ version: 1, previous_version: null });
  });

  it('shows the changes, the biomass method shares and the plot-size note on the region page', async () => {
    const page = await app.inject({ url: '/regions/Northvale', headers: auth });
    expect(page.statusCode).toBe(200);
    expect(page.body).toContain('What changed since version 1');
    expect(page.body).toMatch(/Plots added \(1\): NV-W4/);
    expect(page.body).toMatch(/Plots removed \(1\): NV-W3/);
    expect(page.body).toContain('id="moved-estimates"');
    expect(page.body).toContain('id="biomass-method"');
    expect(page.body).toContain('Plots here differ in size (4 of 0.1 ha, 1 of 0.5 ha)');
  });

  it('serves the biomass method shares in the summary: Σ share·AGB / Σ AGB over the plots with shares', async () => {
    const body = (await app.inject({ url: '/v1/regions/Northvale/summary', headers: auth })).json() as { biomass_method: Array<Record<string, number | string | null>>; plot_sizes: unknown[] };
    const all = body.biomass_method.find((r) => r.forest_type === 'all')!;
    // only NV-W4 has shares (the scenario's plots have none): its own shares, computed by hand
    expect(all.n_plots).toBe(1);
    expect(all.height_measured).toBeCloseTo(0.25, 15);
    expect(all.wd_default).toBeCloseTo(0.5, 15);
    expect(body.plot_sizes).toEqual([
      { forest_type: 'dry', area_ha: 0.1, n_plots: 2 },
      { forest_type: 'wet', area_ha: 0.1, n_plots: 2 },
      { forest_type: 'wet', area_ha: 0.5, n_plots: 1 },
    ]);
  });
});
