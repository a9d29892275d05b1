import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getNationalSnapshot, getSummarySnapshot, markStale } from '@stemwise/db';
import type { RegionRow, ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { buildServer, ChangeResponse, createProcessors, listRegionExportRows, SummaryResponse, writeRegionPages, type NationalPayload, type SnapshotPayload } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { budget, seedChangePairs } from './change-fixture';
import { jobContext, seedRun } from './fixture';
import { seedScenario } from './seed-scenario';
import { createToken } from './tokens';

// The whole carbon uncertainty in the summaries job (docs/methods.md#carbon-uncertainty): plots whose
// metrics kept no sums get a note instead of an interval; with sums, the region and national summaries
// carry the section, the carbon_mg_ha rows carry the whole interval, its sampling interval is the
// summary's own (two code paths, one estimator), the same data give the same version, and the page says
// what the intervals do not cover.

let s: TestServices;
let deps: ServiceDeps;
const out = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-carbon-'));

async function runSummaries(): Promise<void> {
  await createProcessors(deps)['report.summaries']!({ runId: await seedRun(s.db) }, jobContext(testLogger()));
}
const region = async (name: string): Promise<{ version: number; payload: SnapshotPayload }> => {
  const snap = await getSummarySnapshot(s.db, name);
  if (!snap) throw new Error(`no snapshot of ${name}`);
  return { version: snap.version, payload: snap.payload as SnapshotPayload };
};
const carbonRow = (rows: readonly RegionRow[], forestType: string, variable = 'carbon_mg_ha'): RegionRow => rows.find((r) => r.variable === variable && r.forest_type === forestType) as RegionRow;

describe('carbon uncertainty in the summaries', () => {
  beforeAll(async () => {
    s = await useServices({ STEMWISE_CARBON_DRAWS: '2000' });
    deps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedScenario(s.db);
    // Northvale's five plots measured twice, four years apart: net AGB change −1.5 … +2.5 Mg/ha/yr
    await seedChangePairs(
      s.db,
      ['NV-W1', 'NV-W2', 'NV-W3', 'NV-D1', 'NV-D2'].map((plotKey, i) => ({ plotKey, dateFrom: '2021-06-01', years: 4, values: budget(2 + 0.5 * i, 0.5, 3 - i, 1) })),
    );
    await markStale(s.db, 'summary', ['Northvale', 'Southmere']);
  });
  afterAll(async () => {
    await s?.cleanup();
    fs.rmSync(out, { recursive: true, force: true });
  });

  it('says why there is no whole interval when the plots kept no sums', async () => {
    await runSummaries();
    const { payload } = await region('Northvale');
    expect(payload.carbon_uncertainty?.rows).toEqual([]);
    expect(payload.carbon_uncertainty?.missing).toMatch(/5 plot\(s\) were computed before .*recompute --all/);
    expect(carbonRow(payload.summary.rows, 'all').whole_ci_low).toBeNull();
    expect(payload.tree_carbon_uncertainty?.missing).toMatch(/5 plot\(s\) were computed before the sums of the tree pool/);
    expect(payload.carbon_change_uncertainty?.missing).toMatch(/5 plot\(s\) have a change between visits computed before/);
    expect(payload.tree_carbon_change_uncertainty?.missing).toMatch(/5 plot\(s\) have a change between visits computed before the sums of the tree pool change/);
    expect((await region('Southmere')).payload.carbon_change_uncertainty?.missing).toBe('no plot measured twice');
  });

  it('with sums: the section, the whole interval on the carbon rows, the summary’s own sampling interval', async () => {
    // Sums as the metrics stage keeps them: the plot's AGB (carbon / 0.47), and per-tree sums of a
    // plot of 0.1 ha whose measured-height trees weigh 10 stems/ha each.
    await s.db.query(
      `update plot_metrics m set diagnostics = jsonb_build_object('carbonMoments', jsonb_build_object(
         'value', m.carbon_mg_ha / 0.47, 'sq', jsonb_build_array(m.carbon_mg_ha / 0.47 * 0.8, 0, 0),
         'sqPlot', jsonb_build_array(m.carbon_mg_ha / 0.47 * 8, 0, 0), 'lnD', jsonb_build_array(0, 0, 0, 0, 0)))
        where m.carbon_mg_ha is not null`,
    );
    // The tree pool: each plot's own ratio (0.24, or 0.2 on the dry plots: two rows), 2 Mg/ha of standing
    // dead wood; tree_carbon_mg_ha = 0.47·((1 + R)·AGB + 2), as the metrics stage computes it.
    await s.db.query(
      `update plot_metrics m set
         tree_carbon_mg_ha = m.carbon_mg_ha * (1 + r.ratio) + 0.47 * 2,
         diagnostics = jsonb_set(m.diagnostics, '{carbonMoments}', m.diagnostics->'carbonMoments' || jsonb_build_object(
           'rootShoot', jsonb_build_object('ratio', r.ratio, 'sd', r.sd, 'row', r.row),
           'deadWood', jsonb_build_object('value', 2, 'sq', jsonb_build_array(0, 0, 0.4), 'sqPlot', jsonb_build_array(0, 0, 4), 'lnD', jsonb_build_array(0, 0, 0, 0, 0))))
        from plot_visits v join plots p on p.id = v.plot_id,
             lateral (select case when p.forest_type = 'dry' then 0.2 else 0.24 end ratio, case when p.forest_type = 'dry' then 0.046 else 0.032 end sd,
                             case when p.forest_type = 'dry' then 'tropical_moist_deciduous:0' else 'tropical_moist_deciduous:1' end "row") r
       where v.id = m.visit_id and m.carbon_mg_ha is not null`,
    );
    // The change: sums of a pair whose trees were measured (no height model), Σu²/w a tenth of |Σu|
    await s.db.query(
      `update plot_change set carbon_moments = jsonb_build_object('value', agb_net_change_mg_ha_yr,
         'sq', jsonb_build_array(abs(agb_net_change_mg_ha_yr) * 0.1, 0, 0), 'sqPlot', jsonb_build_array(abs(agb_net_change_mg_ha_yr), 0, 0), 'lnD', jsonb_build_array(0, 0, 0, 0, 0))`,
    );
    // The tree pool's change: live AGB S₁/t = 10 and S₂/t = 10 + net Mg/ha/yr, each visit's ratio (wet plots: 0.24 at both
    // visits, one row; dry plots: 0.24 then 0.2, another row at the second visit; SD 15 % of the ratio), dead wood +0.1;
    // tree_carbon_net_change_mg_ha_yr = 0.47·((1 + R₂)·S₂/t − (1 + R₁)·S₁/t + 0.1), as the change stage computes it.
    await s.db.query(
      `with t as (
         select c.visit_from_id, c.visit_to_id, x.*, (1 + x.r2) * (10 + c.agb_net_change_mg_ha_yr) - (1 + x.r1) * 10 + 0.1 "value", 10 + c.agb_net_change_mg_ha_yr s2
           from plot_change c join plots p on p.id = c.plot_id,
                lateral (select 0.24 r1, case when p.forest_type = 'dry' then 0.2 else 0.24 end r2, 'zone:1' row1,
                                case when p.forest_type = 'dry' then 'zone:0' else 'zone:1' end row2) x)
       update plot_change c set
         tree_carbon_net_change_mg_ha_yr = 0.47 * t.value,
         carbon_moments = c.carbon_moments || jsonb_build_object('trees', jsonb_build_object('value', t.value,
           'sq', jsonb_build_array(abs(t.value) * 0.1, 0, 0), 'sqPlot', jsonb_build_array(abs(t.value), 0, 0), 'lnD', jsonb_build_array(0, 0, 0, 0, 0),
           'rootShootParts', jsonb_build_array(jsonb_build_object('ratio', t.r1, 'sd', 0.15 * t.r1, 'row', t.row1, 'agb', -10),
                                               jsonb_build_object('ratio', t.r2, 'sd', 0.15 * t.r2, 'row', t.row2, 'agb', t.s2))))
         from t where t.visit_from_id = c.visit_from_id and t.visit_to_id = c.visit_to_id`,
    );
    await markStale(s.db, 'summary', ['Northvale', 'Southmere']);
    await runSummaries();
    const { version, payload } = await region('Northvale');
    const section = payload.carbon_uncertainty!;
    expect(section.missing).toBeNull();
    expect(section.tree_error_scope).toBe('forest');
    expect(section.rows.map((r) => r.forest_type)).toEqual(['all', 'dry', 'wet']);
    const row = carbonRow(payload.summary.rows, 'all');
    const whole = section.rows[0];
    expect(whole.mean).toBeCloseTo(row.mean as number, 9);
    expect(whole.sampling_ci_low).toBeCloseTo(row.ci_low as number, 9);
    expect(whole.sampling_ci_high).toBeCloseTo(row.ci_high as number, 9);
    expect(row.whole_ci_low).toBe(whole.whole_ci_low);
    expect(row.total_whole_ci_high).toBe(whole.total_whole_ci_high);
    expect(whole.whole_ci_low).toBeLessThan(row.mean as number);
    expect(whole.whole_ci_high).toBeGreaterThan(row.mean as number);
    expect(Object.values(whole.shares).reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
    // The tree pool and the change: their own rows, the summary's sampling intervals, wider whole ones
    for (const [sec, variable] of [
      [payload.tree_carbon_uncertainty!, 'tree_carbon_mg_ha'],
      [payload.carbon_change_uncertainty!, 'carbon_net_change_mg_ha_yr'],
      [payload.tree_carbon_change_uncertainty!, 'tree_carbon_net_change_mg_ha_yr'],
    ] as const) {
      expect(sec.missing).toBeNull();
      expect(sec.variable).toBe(variable);
      const summaryRow = carbonRow(payload.summary.rows, 'all', variable);
      const w = sec.rows[0];
      expect(w.forest_type).toBe('all');
      expect(w.mean).toBeCloseTo(summaryRow.mean as number, 9);
      expect(w.sampling_ci_low).toBeCloseTo(summaryRow.ci_low as number, 9);
      expect(w.sampling_ci_high).toBeCloseTo(summaryRow.ci_high as number, 9);
      expect(summaryRow.whole_ci_low).toBe(w.whole_ci_low);
      // never inside the sampling interval (here the model errors are small beside five plots' spread)
      expect(w.whole_ci_low).toBeLessThanOrEqual(w.sampling_ci_low);
      expect(w.whole_ci_high).toBeGreaterThanOrEqual(w.sampling_ci_high);
      expect(w.whole_se).toBeGreaterThan(w.sampling_se);
    }
    expect(payload.tree_carbon_uncertainty!.rows[0].shares.rootShoot).toBeGreaterThan(0);
    expect(payload.carbon_change_uncertainty!.rows[0].shares.rootShoot).toBe(0);
    expect(payload.tree_carbon_change_uncertainty!.rows[0].shares.rootShoot).toBeGreaterThan(0);
    expect(payload.tree_carbon_change_uncertainty!.rows.map((r) => r.forest_type)).toEqual(['all', 'dry', 'wet']);
    // Southmere has no forest areas: per-tree errors over its measured trees only, no totals
    const south = (await region('Southmere')).payload.carbon_uncertainty!;
    expect(south.tree_error_scope).toBe('plots');
    expect(south.rows[0].total).toBeNull();
    // national rows too, and export regions carries the columns
    const national = (await getNationalSnapshot(s.db))!.payload as NationalPayload;
    expect(national.carbon_uncertainty?.rows[0].forest_type).toBe('all');
    expect(carbonRow(national.summary.rows, 'all').whole_ci_high).toBe(national.carbon_uncertainty?.rows[0].whole_ci_high);
    const exported = await listRegionExportRows(s.db, 'Northvale');
    expect(carbonRow(exported, 'all').whole_se).toBe(whole.whole_se);
    expect(carbonRow(exported, 'all').whole_se).toBeGreaterThan(0);
    expect(exported.find((r) => r.variable === 'basal_area_m2_ha')?.whole_se).toBeNull();
    expect(carbonRow(exported, 'all', 'tree_carbon_mg_ha').whole_se).toBe(payload.tree_carbon_uncertainty!.rows[0].whole_se);
    expect(carbonRow(exported, 'all', 'carbon_net_change_mg_ha_yr').whole_se).toBe(payload.carbon_change_uncertainty!.rows[0].whole_se);
    expect(carbonRow(exported, 'all', 'tree_carbon_net_change_mg_ha_yr').whole_se).toBe(payload.tree_carbon_change_uncertainty!.rows[0].whole_se);
    expect(carbonRow(exported, 'wet', 'tree_carbon_net_change_mg_ha_yr').whole_ci_low).toBe(payload.tree_carbon_change_uncertainty!.rows[2].whole_ci_low);
    expect(carbonRow(national.summary.rows, 'all', 'tree_carbon_net_change_mg_ha_yr').whole_ci_high).toBe(national.tree_carbon_change_uncertainty?.rows[0].whole_ci_high);

    // Seeded: the same data again give the same content, so no new version
    await markStale(s.db, 'summary', ['Northvale']);
    await runSummaries();
    expect((await region('Northvale')).version).toBe(version);
  });

  it("the API serves the tree pool change's section in the summary and beside the above-ground one in the change view", async () => {
    const app = await buildServer(deps, { summaryCheckMs: 0 });
    try {
      const headers = { authorization: `Bearer ${(await createToken(s.db, 'admin')).token}` };
      const { payload } = await region('Northvale');
      const summary = (await app.inject({ url: '/v1/regions/Northvale/summary', headers })).json();
      expect(SummaryResponse.safeParse(summary).success).toBe(true);
      expect(summary.tree_carbon_change_uncertainty).toEqual(payload.tree_carbon_change_uncertainty);
      const change = (await app.inject({ url: '/v1/regions/Northvale/change', headers })).json();
      expect(ChangeResponse.safeParse(change).success).toBe(true);
      expect(change.carbon_uncertainty.variable).toBe('carbon_net_change_mg_ha_yr');
      expect(change.tree_carbon_uncertainty.variable).toBe('tree_carbon_net_change_mg_ha_yr');
      expect(change.tree_carbon_uncertainty.rows[0].whole_se).toBe(payload.tree_carbon_change_uncertainty!.rows[0].whole_se);
      const national = (await app.inject({ url: '/v1/national/change', headers })).json();
      expect(national.tree_carbon_uncertainty.rows[0].forest_type).toBe('all');
    } finally {
      await app.close();
    }
  });

  it('the region and national pages show both intervals and what they do not cover', async () => {
    const written = await writeRegionPages(deps, out);
    const page = fs.readFileSync(written.regions.find((r) => r.region === 'Northvale')!.page, 'utf8');
    expect(page).toContain('id="carbon-uncertainty"');
    expect(page).toMatch(/95 % CI, sampling only[^]*95 % CI, whole/);
    expect(page).toContain('field measurement error');
    expect(page).toContain('forest-area map');
    expect(page).toMatch(/id="carbon-uncertainty"[^]*id="tree-carbon-uncertainty"[^]*id="carbon-change-uncertainty"[^]*id="tree-carbon-change-uncertainty"/);
    expect(page).toContain('root-to-shoot ratio (shared by row)');
    const national = fs.readFileSync(written.national as string, 'utf8');
    expect(national).toContain('id="carbon-shares"');
    expect(national).toContain('id="tree-carbon-change-whole"');
  });
});
