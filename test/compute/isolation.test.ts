import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { listStale, markStale, markVisitsStale, type Db } from '@stemwise/db';
import type { Config } from '@stemwise/platform';
import { MIN_REGION_PLOTS } from '@stemwise/compute';
import { createProcessors as reportProcessors } from '@stemwise/report';
import { batchReport } from '@stemwise/core';
import { formatBatchReport } from '@stemwise/ingest';
import { DEMO_DATA_DIR } from '@stemwise/demo-inventory';
import { renderRegionPage } from '../../services/report/src/page/region-page';
import { listRegionProblems, problemView, getSummarySnapshot } from '@stemwise/db';
import { loadDemoInventory } from './demo-loader';
import { fixtureSpecies, generateInventory, loadInventory, loadSpecies } from './fixtures';
import { recomputeInProcess } from './support';
import { useServices, type TestServices } from '../support/services';

// One plot, one forest type or one region that cannot be computed never stops the others (issue:
// hardening). The science is total on degenerate data, so a failure is forced here by a poisoned
// value that these wrappers turn into an exception, as a bug or an unforeseen input would.
const POISON_Y = 777.125; // a fisher_alpha no plot has: the wrapped fitCurves throws on it
const POISON_DBH = 444.4; // a stem diameter no plot has: the wrapped computePlotMetrics throws on it
const POISON_REGION = 'Poisonmere'; // the wrapped summariseRegion throws for this region

vi.mock('../../core/src/science/verdict', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../core/src/science/verdict')>();
  return {
    ...real,
    fitCurves: (points: Parameters<typeof real.fitCurves>[0], options?: Parameters<typeof real.fitCurves>[1]) => {
      if (points.some((p) => p.y === POISON_Y)) throw new Error('poisoned fit input (test)');
      return real.fitCurves(points, options);
    },
  };
});
vi.mock('../../core/src/science/plot-metrics', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../core/src/science/plot-metrics')>();
  return {
    ...real,
    computePlotMetrics: (...args: Parameters<typeof real.computePlotMetrics>) => {
      if (args[1].some((s) => s.dbhCm === POISON_DBH)) throw new TypeError('poisoned plot input (test)');
      return real.computePlotMetrics(...args);
    },
  };
});
vi.mock('../../services/report/src/summary/region-summary', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../services/report/src/summary/region-summary')>();
  return {
    ...real,
    summariseRegion: (input: Parameters<typeof real.summariseRegion>[0]) => {
      if (input.region === POISON_REGION) throw new TypeError('poisoned region input (test)');
      return real.summariseRegion(input);
    },
  };
});

/** A recompute run to its end in this process with the real compute and report jobs, and the run's state. */
async function runRecompute(config: Config, db: Db): Promise<{ runId: string | null; failures: readonly { jobId: string; error: string }[]; state: string | null }> {
  const { plan, failures } = await recomputeInProcess(config, db, false, reportProcessors);
  const runId = plan?.runId ?? null;
  const [run] = runId ? await db.query<{ state: string }>(`select state from recompute_runs where id = $1`, [runId]) : [];
  return { runId, failures, state: run?.state ?? null };
}

async function fitScopes(db: Db): Promise<string[]> {
  return (await db.query<{ k: string }>(`select scope_kind || ':' || scope || ':' || forest_type k from curve_fits where model = 'linear' order by 1`)).map((r) => r.k);
}

describe('a region named all', () => {
  let s: TestServices;
  beforeAll(async () => {
    s = await useServices({ STEMWISE_BOOTSTRAP: '50' });
    await loadSpecies(s.db, fixtureSpecies());
    const inventory = generateInventory({ seed: 5, plotsPerCell: MIN_REGION_PLOTS + 10, stemsPerPlot: 20 }).map((p) => (p.region === 'Harrowmere' ? { ...p, region: 'all' } : p));
    await loadInventory(s.db, inventory);
  }, 120_000);
  afterAll(async () => s?.cleanup());

  it('computes: fits of the region `all` beside the forest-type-wide fits, summaries fresh, the run done', async () => {
    const { failures, state } = await runRecompute(s.config, s.db);
    expect(failures).toEqual([]);
    expect(state).toBe('done');
    const scopes = await fitScopes(s.db);
    for (const t of ['dry', 'moist', 'wet']) {
      expect(scopes).toContain(`forest_type:all:${t}`);
      expect(scopes).toContain(`region:all:${t}`);
    }
    expect(await listStale(s.db, 'fits')).toEqual([]);
    expect(await listStale(s.db, 'summary')).toEqual([]);
    const snap = await getSummarySnapshot(s.db, 'all');
    expect(snap?.version).toBe(1);
    const [{ n }] = await s.db.query<{ n: number }>(`select count(*)::int n from compute_problems`);
    expect(n).toBe(0);
  });
});

describe('the demo plots entered three times under new ids', () => {
  let s: TestServices;
  let batchId: string;
  beforeAll(async () => {
    s = await useServices({ STEMWISE_BOOTSTRAP: '50' });
    ({ batchId } = await loadDemoInventory(s.db, DEMO_DATA_DIR));
    const first = await runRecompute(s.config, s.db);
    expect(first.failures).toEqual([]);
    // Two more copies of every plot with its visit and metrics, under new plot ids: the figures a
    // second and third upload of the same plots would compute (computing 500k more stems adds nothing).
    for (const copy of ['b', 'c']) {
      await s.db.query(`insert into plots (plot_key, region_id, forest_type, latitude, longitude, elevation_m)
        select plot_key || '_${copy}', region_id, forest_type, latitude, longitude, elevation_m from plots where plot_key not like '%\\_%'`);
      await s.db.query(`insert into plot_visits (plot_id, survey_date, batch_id, area_ha, dbh_min_cm, subplot_area_ha, subplot_dbh_min_cm, logging_class, fire_class, stale)
        select c.id, v.survey_date, v.batch_id, v.area_ha, v.dbh_min_cm, v.subplot_area_ha, v.subplot_dbh_min_cm, v.logging_class, v.fire_class, false
          from plot_visits v join plots p on p.id = v.plot_id join plots c on c.plot_key = p.plot_key || '_${copy}'`);
      await s.db.query(`insert into plot_metrics select (jsonb_populate_record(null::plot_metrics, to_jsonb(m) || jsonb_build_object('visit_id', cv.id))).*
          from plot_metrics m join plot_visits v on v.id = m.visit_id join plots p on p.id = v.plot_id
          join plots c on c.plot_key = p.plot_key || '_${copy}' join plot_visits cv on cv.plot_id = c.id`);
    }
    await markStale(s.db, 'fits', ['dry', 'moist', 'wet']);
  }, 240_000);
  afterAll(async () => s?.cleanup());

  it('fits every forest type and region without an exception; the run ends done and nothing is left stale', async () => {
    const [{ n }] = await s.db.query<{ n: number }>(`select count(*)::int n from plot_metrics`);
    expect(n).toBe(1350);
    const { failures, state } = await runRecompute(s.config, s.db);
    expect(failures).toEqual([]);
    expect(state).toBe('done');
    expect(await listStale(s.db, 'fits')).toEqual([]);
    expect(await listStale(s.db, 'summary')).toEqual([]);
    const fits = await s.db.query<{ scope_kind: string; scope: string; forest_type: string; n: number }>(`select scope_kind, scope, forest_type, n from curve_fits where model = 'quadratic'`);
    // 39 demo plots of moist forest in Caldereth, three times: a region fit that threw before
    expect(fits.find((f) => f.scope === 'Caldereth' && f.forest_type === 'moist')?.n).toBe(117);
    expect(fits.filter((f) => f.scope_kind === 'forest_type').map((f) => f.n)).toEqual([450, 450, 450]);
    const report = await batchReport(s.db, batchId);
    expect(report?.computeProblems).toEqual([]);
  });
});

describe('a forest type, a plot and a region that cannot be computed', () => {
  let s: TestServices;
  let batchId: string;
  let runId: string;
  beforeAll(async () => {
    s = await useServices({ STEMWISE_BOOTSTRAP: '20' });
    await loadSpecies(s.db, fixtureSpecies());
    const inventory = generateInventory({ seed: 9, plotsPerCell: 6, stemsPerPlot: 20 }).map((p) => (p.region === 'Sallowfen' ? { ...p, region: POISON_REGION } : p));
    ({ batchId } = await loadInventory(s.db, inventory));
    expect((await runRecompute(s.config, s.db)).state).toBe('done');
    // poison: one dry plot's metric (its fit throws), one moist plot's stem (its metrics throw)
    await s.db.query(`update plot_metrics set fisher_alpha = $1 where visit_id = (select v.id from plot_visits v join plots p on p.id = v.plot_id where p.forest_type = 'dry' order by v.id limit 1)`, [POISON_Y]);
    const [{ visit_id }] = await s.db.query<{ visit_id: number }>(`select v.id visit_id from plot_visits v join plots p on p.id = v.plot_id where p.forest_type = 'moist' and p.plot_key = 'P0020' order by v.id limit 1`);
    await s.db.query(`update stems set dbh_cm = $1 where visit_id = $2 and tree_id = (select min(tree_id) from stems where visit_id = $2)`, [POISON_DBH, visit_id]);
    await markVisitsStale(s.db, [visit_id]);
    await markStale(s.db, 'fits', ['dry', 'moist', 'wet']);
    await markStale(s.db, 'summary', ['Harrowmere', 'Kestrel Downs', POISON_REGION]);
    const run = await runRecompute(s.config, s.db);
    expect(run.failures).toEqual([]);
    runId = run.runId!;
  }, 120_000);
  afterAll(async () => s?.cleanup());

  it('records each with its reason; the run ends done and the rest is fresh', async () => {
    const [run] = await s.db.query<{ state: string; details: { problems: number } }>(`select state, details from recompute_runs where id = $1`, [runId]);
    expect(run.state).toBe('done');
    // P0020 has two visits: with its metrics, its change between visits cannot be computed either.
    expect(run.details.problems).toBe(4);
    const problems = await s.db.query<{ stage: string; forest_type: string | null; region: string | null; plot_key: string | null; reason: string; run_id: string }>(
      `select stage, forest_type, region, plot_key, reason, run_id from compute_problems order by stage`,
    );
    expect(problems.map((p) => [p.stage, p.forest_type, p.region, p.plot_key])).toEqual([
      ['change', 'moist', expect.any(String), 'P0020'],
      ['fit', 'dry', null, null],
      ['plot', 'moist', expect.any(String), 'P0020'],
      ['summary', null, POISON_REGION, null],
    ]);
    expect(problems.map((p) => p.reason)).toEqual(['poisoned plot input (test)', 'poisoned fit input (test)', 'poisoned plot input (test)', 'poisoned region input (test)']);
    expect(problems.every((p) => p.run_id === runId)).toBe(true);
    // everything else fresh: no stale marks or visits; the other forest types fitted in this run; the other regions summarised
    expect(await listStale(s.db, 'fits')).toEqual([]);
    expect(await listStale(s.db, 'summary')).toEqual([]);
    const [{ stale }] = await s.db.query<{ stale: number }>(`select count(*)::int stale from plot_visits where stale`);
    expect(stale).toBe(0);
    const fresh = await s.db.query<{ forest_type: string; fresh: boolean }>(
      `select forest_type, bool_and(computed_at >= (select started_at from recompute_runs where id = $1)) fresh from curve_fits where scope_kind = 'forest_type' group by 1 order by 1`,
      [runId],
    );
    expect(fresh).toEqual([{ forest_type: 'dry', fresh: false }, { forest_type: 'moist', fresh: true }, { forest_type: 'wet', fresh: true }]);
    expect((await getSummarySnapshot(s.db, 'Harrowmere'))?.version).toBeGreaterThanOrEqual(1);
  });

  it('shows the reasons in the batch report (batch show, text and JSON; GET /v1/batches/:id)', async () => {
    const report = (await batchReport(s.db, batchId))!;
    expect(report.computeProblems.map((p) => p.stage)).toEqual(['plot', 'change', 'fit', 'summary']);
    expect(report.computeProblems[0]).toMatchObject({ plot_id: 'P0020', run_id: runId, reason: 'poisoned plot input (test)' });
    const text = formatBatchReport({ ...report, files: [] }); // the fixture's batch has no file list
    expect(text).toMatch(/not computed/);
    expect(text).toMatch(/fit of forest type dry not computed .*poisoned fit input/);
    expect(text).toMatch(/change between visits of plot P0020 not computed .*poisoned plot input/);
    expect(text).toMatch(new RegExp(`summary of region ${POISON_REGION} not computed`));
  });

  it('shows a short note on the region page', async () => {
    const snap = (await getSummarySnapshot(s.db, 'Harrowmere'))!;
    const problems = (await listRegionProblems(s.db, 'Harrowmere', ['dry', 'moist', 'wet'])).map(problemView);
    expect(problems.map((p) => p.stage)).toContain('fit');
    const page = renderRegionPage({ snapshot: snap as never, versions: [{ version: snap.version, createdAt: snap.createdAt }], problems, links: { index: '/', summaryJson: '#', summaryCsv: '#', plotsGeoJson: '#', versionPage: null, signOut: null } });
    expect(page).toMatch(/id="not-computed"/);
    expect(page).toMatch(/fit of forest type dry not computed/);
  });

  it('is not retried until its data change: the next run finds nothing to do', async () => {
    const again = await runRecompute(s.config, s.db);
    expect(again.runId).toBeNull();
  });
});
