import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listCurveFits, markStale, recordProblems, upsertCurveFits } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { BullQueue } from '@stemwise/platform/bullmq';
import { InProcessQueue } from '@stemwise/platform';
import { buildServer, createProcessors, NationalResponse, SummaryResponse } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { ensureRegion, jobContext, seedPlots, seedRun } from './fixture';
import { seedScenario } from './seed-scenario';
import { createToken } from './tokens';

let s: TestServices;
let deps: ServiceDeps;
let app: FastifyInstance;
let auth: { authorization: string };

async function summaries(): Promise<void> {
  await createProcessors(deps)['report.summaries']!({ runId: await seedRun(s.db) }, jobContext(testLogger()));
}

describe('report API', () => {
  beforeAll(async () => {
    s = await useServices();
    deps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedScenario(s.db);
    // Region names a spreadsheet would run as formulas (names are free text in plots.csv).
    await seedPlots(s.db, [
      { key: 'LK-1', region: '@Lakeside', forestType: 'moist', metrics: { basal_area_m2_ha: 11, fisher_alpha: 3, disturbance_index: 0.1 } },
      { key: 'LK-2', region: '@Lakeside', forestType: 'moist', metrics: { basal_area_m2_ha: 13, fisher_alpha: 4, disturbance_index: 0.2 } },
      { key: 'HS-1', region: '=HYPERLINK("x")', forestType: 'dry', metrics: { basal_area_m2_ha: -0, fisher_alpha: 3, disturbance_index: 0.1 } },
      { key: 'HS-2', region: '=HYPERLINK("x")', forestType: 'dry', metrics: { basal_area_m2_ha: 2, fisher_alpha: 4, disturbance_index: 0.2 } },
    ]);
    await markStale(s.db, 'summary', ['Northvale', 'Southmere', '@Lakeside', '=HYPERLINK("x")']);
    await summaries();
    auth = { authorization: `Bearer ${(await createToken(s.db, 'admin')).token}` };
    app = await buildServer(deps, { summaryCheckMs: 0 });
  });
  afterAll(async () => {
    await app?.close();
    await s?.cleanup();
  });

  it('serves the summary as JSON that matches its documented schema', async () => {
    const res = await app.inject({ url: '/v1/regions/Northvale/summary', headers: auth });
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toBe('application/json; charset=utf-8');
    const body = SummaryResponse.parse(res.json());
    expect(body.version).toBe(1);
    expect(body.summary.rows.find((r) => r.forest_type === 'all' && r.variable === 'basal_area_m2_ha')?.mean).toBe(21);
    expect(res.body).not.toContain('<svg'); // charts are for the page
  });

  it('serves the national summary as JSON matching its schema, as CSV rows of region national, with an ETag', async () => {
    const res = await app.inject({ url: '/v1/national/summary', headers: auth });
    expect(res.statusCode).toBe(200);
    const body = NationalResponse.parse(res.json());
    expect(body.version).toBe(1);
    expect(body.summary.regions).toEqual(['=HYPERLINK("x")', '@Lakeside', 'Northvale', 'Ostmark', 'Southmere']);
    expect(body.summary.rows.every((r) => r.region === 'national')).toBe(true);
    expect(body.data.first_survey).toBe('2025-10-01');
    expect(res.body).not.toContain('<svg');
    const csv = await app.inject({ url: '/v1/national/summary?format=csv', headers: auth });
    expect(csv.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(csv.body.split('\n')[1]).toMatch(/^national,all,stems_ha,/);
    const again = await app.inject({ url: '/v1/national/summary', headers: { ...auth, 'if-none-match': res.headers.etag as string } });
    expect(again.statusCode).toBe(304);
    expect((await app.inject({ url: '/v1/national/summary?version=9', headers: auth })).statusCode).toBe(404);
    expect((await app.inject({ url: '/v1/national/versions', headers: auth })).json()).toMatchObject({ versions: [{ version: 1 }] });
  });

  it('answers 304 to a matching If-None-Match, with separate tags for JSON and CSV', async () => {
    const first = await app.inject({ url: '/v1/regions/Northvale/summary', headers: auth });
    const etag = first.headers.etag as string;
    expect(etag).toMatch(/^"[A-Za-z0-9_-]+"$/);
    const again = await app.inject({ url: '/v1/regions/Northvale/summary', headers: { ...auth, 'if-none-match': etag } });
    expect(again.statusCode).toBe(304);
    expect(again.body).toBe('');
    const csv = await app.inject({ url: '/v1/regions/Northvale/summary', headers: { ...auth, accept: 'text/csv' } });
    expect(csv.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(csv.headers.etag).not.toBe(etag);
    expect((await app.inject({ url: '/v1/regions/Northvale/summary?format=csv', headers: { ...auth, 'if-none-match': etag } })).statusCode).toBe(200);
    expect((await app.inject({ url: '/v1/regions/Northvale/summary', headers: { ...auth, 'if-none-match': `W/"x", ${etag}` } })).statusCode).toBe(304);
  });

  it('keeps earlier versions: ?version=N, the versions list, and a new ETag for the new version', async () => {
    const v1 = await app.inject({ url: '/v1/regions/Northvale/summary', headers: auth });
    await s.db.query(`update plot_metrics m set basal_area_m2_ha = 30 from plot_visits v join plots p on p.id = v.plot_id where m.visit_id = v.id and p.plot_key = 'NV-D1'`);
    await markStale(s.db, 'summary', ['Northvale']);
    await summaries();
    const latest = await app.inject({ url: '/v1/regions/Northvale/summary', headers: { ...auth, 'if-none-match': v1.headers.etag as string } });
    expect(latest.statusCode).toBe(200);
    expect(latest.json().version).toBe(2);
    expect(latest.headers['x-summary-version']).toBe('2');
    const old = await app.inject({ url: '/v1/regions/Northvale/summary?version=1', headers: auth });
    expect(old.json().version).toBe(1);
    expect(old.headers.etag).toBe(v1.headers.etag);
    expect((await app.inject({ url: '/v1/regions/Northvale/summary?version=9', headers: auth })).statusCode).toBe(404);
    expect((await app.inject({ url: '/v1/regions/Northvale/summary?version=zero', headers: auth })).statusCode).toBe(400);
    const versions = (await app.inject({ url: '/v1/regions/Northvale/versions', headers: auth })).json();
    expect(versions.versions.map((v: { version: number }) => v.version)).toEqual([2, 1]);
  });

  it('writes the export regions columns in CSV with formula-like text neutralised', async () => {
    const res = await app.inject({ url: `/v1/regions/${encodeURIComponent('@Lakeside')}/summary?format=csv`, headers: auth });
    expect(res.statusCode).toBe(200);
    const lines = res.body.trimEnd().split('\n');
    expect(lines[0]).toBe('region,forest_type,variable,n_plots,mean,se,ci_low,ci_high,sampling_error_pct,forest_area_ha,total,caution_flag,whole_se,whole_ci_low,whole_ci_high,total_whole_ci_low,total_whole_ci_high');
    expect(lines[1].startsWith("'@Lakeside,all,")).toBe(true);
    const hs = await app.inject({ url: `/v1/regions/${encodeURIComponent('=HYPERLINK("x")')}/summary?format=csv`, headers: auth });
    const row = hs.body.split('\n').find((l) => l.includes(',basal_area_m2_ha,') && l.includes(',all,'))!;
    expect(row.startsWith(`"'=HYPERLINK(""x"")",all,basal_area_m2_ha,2,1,`)).toBe(true); // mean of -0 and 2; numbers untouched
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="summary-_Lakeside-v1\.csv"$/);
  });

  it('serves the plots as GeoJSON with longitude first and the metric columns as properties', async () => {
    const res = await app.inject({ url: '/v1/regions/Southmere/plots', headers: auth });
    expect(res.headers['content-type']).toBe('application/geo+json; charset=utf-8');
    const fc = res.json();
    expect(fc.type).toBe('FeatureCollection');
    expect(fc.features).toHaveLength(5);
    const f = fc.features[0];
    // fixture: plot i of the seed list at longitude 34 + 0.01 i, latitude −12 + 0.01 i; SM-1 is the sixth (i = 5)
    expect(f.geometry.coordinates).toEqual([expect.closeTo(34.05, 9), expect.closeTo(-11.95, 9)]);
    expect(f.properties).toMatchObject({ plot_id: 'SM-1', region: 'Southmere', forest_type: 'moist', basal_area_m2_ha: 10 });
  });

  it('serves the evidence behind each verdict on the quadratic row, none on the linear one', async () => {
    const json = (await app.inject({ url: '/v1/fits?scope=all&forest_type=wet', headers: auth })).json();
    const quad = json.fits.find((f: { model: string }) => f.model === 'quadratic');
    // the stored details of seed-scenario.ts (WET_EVIDENCE), as columns
    expect(quad).toMatchObject({
      verdict: 'none', plots_left_out: 1, left_out_reasons: 'fisher_alpha:all_singletons=1',
      delta_aicc: -1.8, curvature_p: 0.4, mos_turn_x: 1.2, mos_turn_inside: 'no', mos_result: 'fail',
      two_lines_break_x: 0.35, two_lines_slope_1: 3.1, two_lines_p_1: 0.21, two_lines_slope_2: -0.8, two_lines_p_2: 0.64, two_lines_result: 'fail',
      peak_boot_low: null, peak_boot_high: null,
    });
    const lin = json.fits.find((f: { model: string }) => f.model === 'linear');
    for (const k of ['delta_aicc', 'curvature_p', 'mos_result', 'two_lines_slope_1', 'two_lines_result']) expect(lin[k], k).toBeNull();
    const csv = await app.inject({ url: '/v1/fits?format=csv&scope=all&forest_type=wet', headers: auth });
    expect(csv.body.split('\n')[0]).toMatch(/,verdict,plots_left_out,left_out_reasons,delta_aicc,curvature_p,mos_turn_x,mos_turn_inside,mos_result,two_lines_break_x,two_lines_slope_1,two_lines_p_1,two_lines_slope_2,two_lines_p_2,two_lines_result,peak_boot_low,peak_boot_high$/);
  });

  it('lists fits as JSON or CSV, filtered by scope', async () => {
    const json = (await app.inject({ url: '/v1/fits?scope=all', headers: auth })).json();
    expect(json.fits.every((f: { scope: string }) => f.scope === 'all')).toBe(true);
    expect(json.fits.map((f: { forest_type: string; model: string }) => `${f.forest_type}/${f.model}`).sort()).toEqual(['moist/linear', 'wet/linear', 'wet/quadratic']);
    const csv = await app.inject({ url: '/v1/fits?format=csv&scope=Southmere', headers: auth });
    expect(csv.body.split('\n')[0]).toMatch(/^scope,forest_type,metric,axis,n,model,b0,/);
    expect(csv.body.split('\n')[1]).toMatch(/^Southmere,moist,fisher_alpha,disturbance_index,5,linear,8,2,,1,1,,0\.2,,0\.3,0\.1,30,,,,increasing,/); // then the columns added at the end (docs/exports.md), empty for a fit stored without them
  });

  it('tells a region named `all` from the forest type as a whole, and lists fits that could not be computed', async () => {
    await ensureRegion(s.db, 'all');
    await upsertCurveFits(s.db, [{ ...(await listCurveFits(s.db, { scope: { kind: 'region', region: 'Southmere' }, metric: 'fisher_alpha', axis: 'disturbance_index' }))[0], scope: 'all', n: 7 }]);
    const whole = (await app.inject({ url: '/v1/fits?scope=all', headers: auth })).json();
    expect(whole.fits.map((f: { n: number }) => f.n)).toEqual([5, 5, 5]); // unchanged: the region's row is not among them
    expect(whole.problems).toBeUndefined();
    const region = (await app.inject({ url: '/v1/fits?region=all', headers: auth })).json();
    expect(region.fits.map((f: { scope: string; forest_type: string; n: number }) => [f.scope, f.forest_type, f.n])).toEqual([['all', 'moist', 7]]);
    await recordProblems(s.db, 'run-x', [{ stage: 'fit', forestType: 'dry', region: null, visitId: null, plotKey: null, reason: 'cannot be fitted (test)' }]);
    const listed = (await app.inject({ url: '/v1/fits', headers: auth })).json();
    expect(listed.problems).toEqual([{ stage: 'fit', forest_type: 'dry', region: null, plot_id: null, run_id: 'run-x', reason: 'cannot be fitted (test)' }]);
    await s.db.query(`delete from compute_problems`);
    await s.db.query(`delete from curve_fits where scope_kind = 'region' and scope = 'all'`);
  });

  it('publishes an OpenAPI document listing every API route, and browsable docs', async () => {
    const doc = (await app.inject({ url: '/openapi.json' })).json();
    expect(doc.openapi).toMatch(/^3\./);
    const paths = Object.keys(doc.paths).sort();
    for (const p of ['/v1/regions', '/v1/regions/{region}/summary', '/v1/regions/{region}/versions', '/v1/regions/{region}/plots', '/v1/national/summary', '/v1/national/versions', '/v1/fits', '/v1/batches', '/v1/batches/{id}', '/v1/batches/{id}/errors.csv', '/healthz', '/readyz', '/metrics']) {
      expect(paths).toContain(p);
    }
    expect(paths).not.toContain('/regions/{region}'); // pages are not API
    expect(paths).not.toContain('/national');
    expect(doc.paths['/v1/regions/{region}/summary'].get.parameters.map((x: { name: string }) => x.name).sort()).toEqual(['format', 'region', 'version']);
    expect(doc.components.securitySchemes.bearer.scheme).toBe('bearer');
    const docs = await app.inject({ url: '/docs/' });
    expect([200, 302]).toContain(docs.statusCode);
  });

  it('exposes queue depth, job counts, batches and the last recompute in the Prometheus text format', async () => {
    const res = await app.inject({ url: '/metrics' });
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/plain; version=0\.0\.4/);
    const lines = res.body.trimEnd().split('\n');
    for (const line of lines) expect(line).toMatch(/^(# (HELP|TYPE) stemwise_[a-z_]+ .+|stemwise_[a-z_]+(\{[a-z_]+="[^"]*"(,[a-z_]+="[^"]*")*\})? -?[0-9.e+-]+)$/);
    for (const q of ['ingest', 'compute', 'report', 'maintenance']) expect(lines).toContain(`stemwise_queue_depth{queue="${q}"} 0`);
    expect(lines).toContain('stemwise_queue_jobs{queue="compute",state="failed"} 0');
    expect(lines).toContain('stemwise_batches{state="computed"} 2'); // the two fixture batches
    expect(lines).toContain('stemwise_batches{state="rejected"} 0');
    const last = Number(lines.find((l) => l.startsWith('stemwise_last_recompute_finished_seconds '))!.split(' ')[1]);
    expect(Math.abs(last - Date.now() / 1000)).toBeLessThan(600);
  });

  it('is ready when PostgreSQL and Redis answer, and says which one does not', async () => {
    const queue = await BullQueue.open({ url: s.redisUrl, prefix: s.prefix, attempts: 1, log: testLogger() });
    const live = await buildServer({ ...deps, queue });
    try {
      const ok = await live.inject({ url: '/readyz' });
      expect(ok.statusCode).toBe(200);
      expect(ok.json()).toEqual({ status: 'ready', checks: { database: { ok: true }, redis: { ok: true } } });
      const broken = await buildServer({ ...deps, queue, db: { ...deps.db, query: async () => Promise.reject(new Error('connection refused')) } });
      const bad = await broken.inject({ url: '/readyz' });
      expect(bad.statusCode).toBe(503);
      // a short status only: /readyz needs no token, and driver messages name hosts, users and databases
      expect(bad.json().checks.database).toEqual({ ok: false, error: 'unreachable' });
      expect(bad.body).not.toMatch(/connection refused/);
      expect(bad.json().checks.redis.ok).toBe(true);
      expect((await broken.inject({ url: '/healthz' })).json()).toEqual({ status: 'ok' });
      await broken.close();
    } finally {
      await live.close();
      await queue.close();
    }
  });

  it('serves regions whose names need escaping in a URL (slash, accents, spaces)', async () => {
    const name = 'Vale/Östra Kulle';
    await seedPlots(s.db, [
      { key: 'VK-1', region: name, forestType: 'wet', metrics: { basal_area_m2_ha: 9, fisher_alpha: 3, disturbance_index: 0.1 } },
      { key: 'VK-2', region: name, forestType: 'wet', metrics: { basal_area_m2_ha: 11, fisher_alpha: 4, disturbance_index: 0.2 } },
    ]);
    await markStale(s.db, 'summary', [name]);
    await summaries();
    const list = (await app.inject({ url: '/v1/regions', headers: auth })).json() as { regions: Array<{ region: string; links: { summary: string; page: string } }> };
    const entry = list.regions.find((r) => r.region === name)!;
    expect(entry.links.summary).toBe('/v1/regions/Vale%2F%C3%96stra%20Kulle/summary');
    const res = await app.inject({ url: entry.links.summary, headers: auth });
    expect(res.statusCode).toBe(200);
    expect(res.json().summary.rows[0]).toMatchObject({ region: name, forest_type: 'all', variable: 'stems_ha' });
    const page = await app.inject({ url: entry.links.page, headers: auth });
    expect(page.statusCode).toBe(200);
    expect(page.body).toContain('Region Vale/Östra Kulle');
  });

  it('keeps serving known summaries to known tokens while the database does not answer', async () => {
    let down = false;
    const flaky = { ...s.db, query: ((text: string, params?: readonly unknown[]) => (down ? Promise.reject(new Error('connection refused')) : s.db.query(text, params))) as typeof s.db.query };
    const srv = await buildServer({ ...deps, db: flaky }, { tokenCacheMs: 1, summaryCheckMs: 0, auditFlushMs: 60_000 });
    try {
      const before = await srv.inject({ url: '/v1/regions/Southmere/summary', headers: auth });
      expect(before.statusCode).toBe(200);
      down = true;
      await new Promise((r) => setTimeout(r, 5));
      const during = await srv.inject({ url: '/v1/regions/Southmere/summary', headers: auth });
      expect(during.statusCode).toBe(200);
      expect(during.headers.etag).toBe(before.headers.etag);
      expect((await srv.inject({ url: '/readyz' })).statusCode).toBe(503);
      const stranger = await srv.inject({ url: '/v1/regions', headers: { authorization: `Bearer swt_${'x'.repeat(43)}` } });
      expect(stranger.statusCode).toBe(500); // an unknown token cannot be checked: refused, never admitted
    } finally {
      down = false;
      await srv.close();
    }
  });

  it('answers unknown routes and bad parameters with JSON errors', async () => {
    const nf = await app.inject({ url: '/v1/nothing', headers: auth });
    expect(nf.statusCode).toBe(404);
    expect(nf.json().error).toBe('not_found');
    const bad = await app.inject({ url: '/v1/regions/Northvale/summary?format=xml', headers: auth });
    expect(bad.statusCode).toBe(400);
    expect(bad.json()).toMatchObject({ error: 'bad_request' });
  });
});
