import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import { getNationalSnapshot, getSummarySnapshot, listNationalVersions, listStale, listSummaryVersions, markStale } from '@stemwise/db';
import type { RegionRow, ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { assembleNationalSnapshot, createProcessors, type NationalPayload, type SnapshotPayload } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { jobContext, seedPlots, seedRun } from './fixture';
import { seedScenario } from './seed-scenario';

// The report.summaries job end to end: plots and forest areas inserted with SQL, the job run, the
// stored snapshot compared with estimates worked by hand (Cochran 1977, Sampling Techniques, ch. 5:
// ȳ_st = Σ W_h ȳ_h, v(ȳ_st) = Σ W_h² s_h²/n_h, Satterthwaite df eq. 5.16).

const rel = 1e-9; // hand computations are exact rationals; floating point only
let s: TestServices;
let deps: ServiceDeps;

function row(p: SnapshotPayload | NationalPayload, forestType: string, variable: string): RegionRow {
  const r = p.summary.rows.find((x) => x.forest_type === forestType && x.variable === variable);
  if (!r) throw new Error(`no row ${forestType} ${variable}`);
  return r;
}

async function runSummaries(): Promise<{ runId: string; result: unknown }> {
  const runId = await seedRun(s.db);
  const result = await createProcessors(deps)['report.summaries']!({ runId }, jobContext(testLogger()));
  return { runId, result };
}

let firstRunDone = false;
/** Version 1 of the stale regions, as the first test stores it: run here when a test runs without it (vitest -t). */
async function firstRun(): Promise<void> {
  if (firstRunDone) return;
  await runSummaries();
  firstRunDone = true;
}

async function latest(region: string): Promise<{ version: number; etag: string; payload: SnapshotPayload }> {
  const snap = await getSummarySnapshot(s.db, region);
  if (!snap) throw new Error(`no snapshot of ${region}`);
  return { version: snap.version, etag: snap.etag, payload: snap.payload as SnapshotPayload };
}

describe('report.summaries', () => {
  beforeAll(async () => {
    s = await useServices();
    deps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedScenario(s.db);
    await markStale(s.db, 'summary', ['Northvale', 'Southmere']);
  });
  afterAll(async () => s?.cleanup());

  it('stores version 1 of each stale region, clears the marks and finishes the run', async () => {
    const { runId } = await runSummaries();
    firstRunDone = true;
    expect((await latest('Northvale')).version).toBe(1);
    expect((await latest('Southmere')).version).toBe(1);
    expect(await getSummarySnapshot(s.db, 'Ostmark')).toBeNull(); // never marked stale
    expect(await listStale(s.db, 'summary')).toEqual([]);
    const [run] = await s.db.query<{ state: string; details: { summaries: { regions: number } } }>(`select state, details from recompute_runs where id = $1`, [runId]);
    expect(run.state).toBe('done');
    expect(run.details.summaries.regions).toBe(2);
  });

  it('matches the hand computation for area-weighted strata (Northvale basal area)', async () => {
    await firstRun();
    const { payload } = await latest('Northvale');
    expect(payload.summary.weighting).toBe('area');
    // wet: 20, 24, 28 → ȳ = 24, s² = 16, n = 3; dry: 10, 14 → ȳ = 12, s² = 8, n = 2; W = 3000/4000, 1000/4000 (computed by hand)
    const all = row(payload, 'all', 'basal_area_m2_ha');
    expect(all.n_plots).toBe(5);
    expect(all.mean).toBeCloseTo(21, 12); // 0.75·24 + 0.25·12
    const v = 0.5625 * (16 / 3) + 0.0625 * (8 / 2); // = 3.25
    expect(all.se!).toBeCloseTo(Math.sqrt(v), 12);
    const df = (v * v) / ((3 * 3) / 2 + (0.25 * 0.25) / 1); // Satterthwaite: 10.5625 / 4.5625 = 2.31506849…
    const detail = payload.summary.estimate_details.find((d) => d.variable === 'basal_area_m2_ha')!;
    expect(detail.df!).toBeCloseTo(df, 10);
    // t at a non-integer df: @stdlib's Student t quantile as the reference library (tolerance 1e-9 relative)
    const t = tQuantile(0.975, df);
    expect(Math.abs((all.ci_high! - 21) / (t * Math.sqrt(v)) - 1)).toBeLessThan(rel);
    expect(Math.abs(all.sampling_error_pct! / ((100 * t * Math.sqrt(v)) / 21) - 1)).toBeLessThan(rel);
    expect(all.forest_area_ha).toBe(4000);
    expect(all.total).toBeCloseTo(84_000, 8); // 21 m²/ha × 4000 ha

    // wet alone: SE = √(16/3); t₀.₉₇₅,₂ = 4.303 (NIST/SEMATECH e-Handbook 1.3.6.7.2, 3 decimals)
    const wet = row(payload, 'wet', 'basal_area_m2_ha');
    expect(wet.mean).toBe(24);
    expect(wet.se!).toBeCloseTo(Math.sqrt(16 / 3), 12);
    expect(wet.ci_high!).toBeCloseTo(24 + 4.303 * Math.sqrt(16 / 3), 2);
    expect(wet.total).toBeCloseTo(72_000, 8);
  });

  it('matches the hand computation for carbon totals (Northvale)', async () => {
    await firstRun();
    const { payload } = await latest('Northvale');
    // wet 90, 110, 130 → 110, s² 400; dry 40, 56 → 48, s² 128 (by hand)
    const all = row(payload, 'all', 'carbon_mg_ha');
    expect(all.mean).toBeCloseTo(94.5, 12);
    expect(all.se!).toBeCloseTo(Math.sqrt(0.5625 * (400 / 3) + 0.0625 * (128 / 2)), 12); // √79
    const total = payload.summary.totals.find((t) => t.forest_type === 'all' && t.variable === 'carbon_mg_ha')!;
    expect(total.total).toBeCloseTo(378_000, 6); // 94.5 Mg C/ha × 4000 ha
    expect(total.se!).toBeCloseTo(4000 * Math.sqrt(79), 6);
  });

  it('weights by plot counts where no forest areas are known, and says so (Southmere)', async () => {
    await firstRun();
    const { payload } = await latest('Southmere');
    expect(payload.summary.weighting).toBe('plot_count');
    expect(payload.summary.notes.some((n) => n.code === 'weights_plot_count')).toBe(true);
    const all = row(payload, 'all', 'basal_area_m2_ha');
    // 10, 12, 14, 16, 18: ȳ = 14, s² = 10, SE = √2 (by hand); one stratum: df = 4, t₀.₉₇₅,₄ = 2.776 (NIST/SEMATECH table)
    expect(all.mean).toBe(14);
    expect(all.se!).toBeCloseTo(Math.SQRT2, 12);
    expect(all.ci_low!).toBeCloseTo(14 - 2.776 * Math.SQRT2, 2);
    expect(all.total).toBeNull();
    expect(all.forest_area_ha).toBeNull();
  });

  it('includes disturbance classes, guild composition and accepted species counts', async () => {
    await firstRun();
    const { payload } = await latest('Northvale');
    // intermediate (0.3 ≤ index < 0.6): wet 1 of 3, dry 1 of 2 → 0.75/3 + 0.25/2 = 0.375 (by hand)
    const inter = payload.summary.disturbance.rows.find((r) => r.forest_type === 'all' && r.class === 'intermediate')!;
    expect(inter.n_plots).toBe(2);
    expect(inter.share!).toBeCloseTo(0.375, 12);
    const shade = payload.summary.guild_composition.find((g) => g.forest_type === 'all' && g.guild === 'shade_tolerant')!;
    expect(shade.mean_share!).toBeCloseTo(0.5, 12);
    // Arborea splendens is a synonym of Arborea lucida; "indet" is not a species
    const species = Object.fromEntries(payload.summary.species!.map((r) => [r.forest_type, r.n_species]));
    expect(species).toEqual({ all: 4, dry: 1, wet: 4 });
  });

  it('carries the fits of its forest types (scope all and its own region) and a highlighted chart each', async () => {
    await firstRun();
    const { payload } = await latest('Northvale');
    expect(new Set(payload.fits.map((f) => `${f.scope}/${f.forest_type}`))).toEqual(new Set(['all/wet', 'Northvale/wet']));
    const wet = payload.charts.fits.find((c) => c.forest_type === 'wet')!;
    expect(wet.points).toBe(5); // 3 Northvale + 2 Ostmark plots of type wet
    expect(wet.highlighted).toBe(3);
    expect(wet.spec ?? wet.missing).toBeTruthy();
    // the charts' specifications, drawn when the page is served (no SVG in the snapshot)
    expect(payload.charts.means).toMatchObject({ title: { text: 'Means with 95 % confidence intervals' } });
    expect(payload.charts.guilds).toMatchObject({ $schema: expect.stringContaining('vega-lite') });
    expect(JSON.stringify(payload.charts)).not.toContain('<svg');
    expect(payload.method.carbon_fraction).toBe(0.47);
  });

  it('stores the national summary in the same job: every region by region × forest type (hand computation)', async () => {
    const national = await getNationalSnapshot(s.db);
    expect(national?.version).toBe(1);
    const p = national!.payload as NationalPayload;
    expect(p.sources).toEqual({ Northvale: 1, Ostmark: null, Southmere: 1 });
    expect(p.data).toEqual({ plots: 12, regions: 3, first_survey: '2025-10-01', last_survey: '2026-03-01' });
    // Southmere and Ostmark have no forest areas: plot-count weights W_h = n_h/n over the four strata
    // Northvale/wet 20 24 28 (ȳ 24, s² 16), Northvale/dry 10 14 (12, 8), Southmere/moist 10…18 (14, 10),
    // Ostmark/wet 30 26 (28, 8): ȳ = (3·24 + 2·12 + 5·14 + 2·28)/12 = 18.5;
    // v = (3/12)²·16/3 + (2/12)²·8/2 + (5/12)²·10/5 + (2/12)²·8/2 = (48 + 16 + 50 + 16)/144 = 65/72 (by hand)
    expect(p.summary.weighting).toBe('plot_count');
    const all = row(p, 'all', 'basal_area_m2_ha');
    expect(all).toMatchObject({ region: 'national', n_plots: 12, total: null });
    expect(all.mean).toBeCloseTo(18.5, 12);
    expect(all.se! / Math.sqrt(65 / 72)).toBeCloseTo(1, 12);
    // wet nationally: Northvale/wet and Ostmark/wet, W = 3/5, 2/5: ȳ = (72 + 56)/5 = 25.6 (by hand)
    expect(row(p, 'wet', 'basal_area_m2_ha').mean).toBeCloseTo(25.6, 12);
  });

  it('is idempotent: with nothing stale it only finishes the run', async () => {
    await firstRun();
    const { runId } = await runSummaries();
    expect((await listSummaryVersions(s.db, 'Northvale')).map((v) => v.version)).toEqual([1]);
    expect((await listNationalVersions(s.db)).map((v) => v.version)).toEqual([1]);
    const [run] = await s.db.query<{ state: string }>(`select state from recompute_runs where id = $1`, [runId]);
    expect(run.state).toBe('done');
  });

  it('adds no version when a stale region comes out the same, and a new version when its data changed', async () => {
    await firstRun();
    const before = await latest('Northvale');
    await markStale(s.db, 'summary', ['Northvale']);
    await runSummaries();
    expect((await latest('Northvale')).version).toBe(1);
    expect(await listStale(s.db, 'summary')).toEqual([]);

    await s.db.query(`update plot_metrics m set basal_area_m2_ha = 32 from plot_visits v join plots p on p.id = v.plot_id where m.visit_id = v.id and p.plot_key = 'NV-W3'`);
    await markStale(s.db, 'summary', ['Northvale']);
    await runSummaries();
    const after = await latest('Northvale');
    expect(after.version).toBe(2);
    expect(after.etag).not.toBe(before.etag);
    expect(row(after.payload, 'wet', 'basal_area_m2_ha').mean).toBeCloseTo(76 / 3, 12);
    const v1 = await getSummarySnapshot(s.db, 'Northvale', 1);
    expect(row(v1!.payload as SnapshotPayload, 'wet', 'basal_area_m2_ha').mean).toBe(24);
    // a region stale → the national summary is assembled again: NV-W3 28 → 32 gives ȳ = 226/12 (by hand)
    const national = await getNationalSnapshot(s.db);
    expect(national?.version).toBe(2);
    expect((national!.payload as NationalPayload).sources.Northvale).toBe(2);
    expect(row(national!.payload as NationalPayload, 'all', 'basal_area_m2_ha').mean).toBeCloseTo(226 / 12, 12);
  });

  it('assembles the national summary from the aggregates kept with each region version, as from the plots to the last bit', async () => {
    await firstRun();
    const national = await getNationalSnapshot(s.db);
    const sources = (national!.payload as NationalPayload).sources;
    const kept = await s.db.query<{ name: string; version: number; kept: boolean }>(
      `select r.name, s.version, s.aggregates is not null kept from region_summaries s join regions r on r.id = s.region_id`,
    );
    const used = kept.filter((k) => sources[k.name] === k.version);
    expect(used.map((k) => k.name).sort()).toEqual(['Northvale', 'Southmere']); // Ostmark has no summary: its plots are read
    expect(used.every((k) => k.kept)).toBe(true);
    expect(kept.filter((k) => sources[k.name] !== k.version).map((k) => [k.name, k.version, k.kept])).toEqual([['Northvale', 1, false]]); // superseded: cleared
    const fromAggregates = JSON.stringify(await assembleNationalSnapshot(deps, sources));
    expect(JSON.parse(fromAggregates)).toStrictEqual(national!.payload);
    // Versions made before the aggregates were kept have none: the plots are read, with the same result.
    await s.db.query(`update region_summaries set aggregates = null`);
    expect(JSON.stringify(await assembleNationalSnapshot(deps, sources))).toBe(fromAggregates);
    // Summarised again with the same content, a region keeps its version and gets its aggregates back.
    await markStale(s.db, 'summary', ['Northvale']);
    await runSummaries();
    const [northvale] = await s.db.query<{ version: number; kept: boolean }>(
      `select s.version, s.aggregates is not null kept from region_summaries s join regions r on r.id = s.region_id where r.name = 'Northvale' order by s.version desc limit 1`,
    );
    expect(northvale).toEqual({ version: sources.Northvale, kept: true });
  });

  it('unmarks a region that no longer exists instead of failing', async () => {
    await markStale(s.db, 'summary', ['Atlantis']);
    await runSummaries();
    expect(await listStale(s.db, 'summary')).toEqual([]);
  });

  it('records the cause and still finishes the run when a region called national was stored before the name was reserved', async () => {
    await seedPlots(s.db, [{ key: 'NA-1', region: 'national', forestType: 'dry', metrics: { basal_area_m2_ha: 9 } }]);
    await markStale(s.db, 'summary', ['national']);
    const runId = await seedRun(s.db);
    const result = (await createProcessors(deps)['report.summaries']!({ runId }, jobContext(testLogger()))) as { national: unknown; rejected: Array<{ region: string; reason: string }> };
    expect(result.national).toBeNull();
    expect(result.rejected.map((r) => r.region)).toContain('national');
    const [run] = await s.db.query<{ state: string }>(`select state from recompute_runs where id = $1`, [runId]);
    expect(run.state).toBe('done');
    const problems = await s.db.query<{ stage: string; reason: string }>(`select stage, reason from compute_problems where run_id = $1`, [runId]);
    expect(problems).toEqual([{ stage: 'summary', reason: expect.stringMatching(/may not be named 'national'/) }]);
    expect((await listNationalVersions(s.db)).map((v) => v.version)).toEqual([2, 1]); // no new version: the last good one stays
  });
});
