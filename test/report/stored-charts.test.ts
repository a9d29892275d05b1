import fs from 'node:fs';
import path from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { getSummarySnapshot, markStale } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { renderVegaLiteSvg, type TopLevelSpec } from '@stemwise/core/charts';
import { InProcessQueue } from '@stemwise/platform';
import { storeFits } from '@stemwise/compute';
import { assembleRegionSnapshot, buildServer, createProcessors, type SnapshotPayload } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { jobContext, seedForestArea, seedPlots, seedRun, seedSpecies, type FixturePlot } from './fixture';
import { createToken } from './tokens';

// The region pages' fit charts come from what the fits job stored (fit_charts): the summaries job
// never fits a curve and draws no chart (it stores each chart's specification); the page draws them
// when first served and keeps the SVG, so a page served again draws nothing.
// fitCurves and the SVG renderer are wrapped in spies that call through (what they compute is unchanged).
const spies = vi.hoisted(() => ({ fitCurves: 0, render: 0 }));
vi.mock('@stemwise/core', async (importOriginal) => {
  const core = await importOriginal<typeof import('@stemwise/core')>();
  return { ...core, fitCurves: (...a: Parameters<typeof core.fitCurves>) => (spies.fitCurves++, core.fitCurves(...a)) };
});
vi.mock('@stemwise/core/charts', async (importOriginal) => {
  const charts = await importOriginal<typeof import('@stemwise/core/charts')>();
  return { ...charts, renderVegaLiteSvg: (...a: Parameters<typeof charts.renderVegaLiteSvg>) => (spies.render++, charts.renderVegaLiteSvg(...a)) };
});

let s: TestServices;
let deps: ServiceDeps;
let app: FastifyInstance;
let auth: { authorization: string };
const guilds = { pioneer_ba_share: 0.2, light_demander_ba_share: 0.3, shade_tolerant_ba_share: 0.4, unassigned_ba_share: 0.1 };

// Invented: 24 plots of forest type `wet` in Fernhollow (every other plot) and Greyridge, a hump-like cloud.
const PLOTS: FixturePlot[] = Array.from({ length: 24 }, (_, i) => {
  const x = i / 23;
  return {
    key: `FH-${String(i + 1).padStart(2, '0')}`,
    region: i % 2 ? 'Greyridge' : 'Fernhollow',
    forestType: 'wet',
    metrics: { basal_area_m2_ha: 15 + i, fisher_alpha: 6 + 10 * x * (1 - x) + (i % 3) * 0.4, disturbance_index: x, ...guilds },
  };
});

async function summaries(): Promise<void> {
  await createProcessors(deps)['report.summaries']!({ runId: await seedRun(s.db) }, jobContext(testLogger()));
}

async function latest(region: string): Promise<{ version: number; payload: SnapshotPayload }> {
  const snap = await getSummarySnapshot(s.db, region);
  return { version: snap!.version, payload: snap!.payload as SnapshotPayload };
}

describe('region page charts from stored fits', () => {
  beforeAll(async () => {
    s = await useServices();
    deps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedSpecies(s.db);
    await seedPlots(s.db, PLOTS);
    await seedForestArea(s.db, 'Fernhollow', 'wet', 5000);
    await storeFits(deps, ['wet']); // marks the summaries of both regions stale
    auth = { authorization: `Bearer ${(await createToken(s.db, 'admin')).token}` };
    app = await buildServer(deps, { summaryCheckMs: 0 });
  });
  afterAll(async () => {
    await app?.close();
    await s?.cleanup();
  });
  beforeEach(() => {
    spies.fitCurves = 0;
    spies.render = 0;
  });

  const page = async (region: string): Promise<string> => {
    const res = await app.inject({ url: `/regions/${region}`, headers: auth });
    expect(res.statusCode).toBe(200);
    return res.body;
  };

  it('the fits job fits (the spy counts); the summaries job neither fits nor draws', async () => {
    await storeFits(deps, ['wet']);
    expect(spies.fitCurves).toBeGreaterThan(0);
    expect(spies.render).toBe(0); // the fits job draws no chart either
    spies.fitCurves = 0;
    await summaries();
    expect(spies.fitCurves).toBe(0);
    expect(spies.render).toBe(0);
    const { payload } = await latest('Fernhollow');
    const chart = payload.charts.fits.find((c) => c.forest_type === 'wet')!;
    expect(chart).toMatchObject({ points: 24, highlighted: 12, missing: null });
    expect(chart.spec).toMatchObject({ title: { text: "wet: Fisher's alpha against Disturbance index" } });
    expect(payload.charts.means).not.toBeNull();
    expect(payload.charts.guilds).not.toBeNull();
    expect(JSON.stringify(payload.charts)).not.toContain('<svg');
  });

  it('the page draws each chart when first served, the same SVG as its specification drawn straight from the job; served again, it draws none', async () => {
    await summaries();
    // The charts as the summaries job specifies them in memory, drawn there (before their trip through the database).
    const { payload: fresh } = await assembleRegionSnapshot(deps, 'Fernhollow');
    const specs = [fresh.charts.means, fresh.charts.guilds, fresh.charts.change, ...fresh.charts.fits.map((c) => c.spec)].filter((c): c is TopLevelSpec => !!c && typeof c === 'object');
    expect(specs).toHaveLength(3); // means, guilds, the fit chart of wet (no change without second visits)
    const expected = await Promise.all(specs.map((spec) => renderVegaLiteSvg(spec)));
    spies.render = 0;
    const first = await page('Fernhollow');
    expect(spies.render).toBe(3);
    for (const svg of expected) expect(first).toContain(svg.replace(/^<svg/, '<svg role="img" focusable="false"')); // the page marks it an image
    const fit = expected[2];
    // drawn with the catalogue's labels and units, the region's points named in the legend and linked to their pages
    expect(fit).toContain("wet: Fisher's alpha against Disturbance index");
    expect(fit).toContain('Disturbance index (0 none – 1 severe)');
    expect(fit).toMatch(/Symbol legend[^"]*plots of Fernhollow/);
    expect(fit).toContain('href="/regions/Fernhollow/plots/FH-01"');
    spies.render = 0;
    expect(await page('Fernhollow')).toBe(first);
    expect(spies.render).toBe(0);
  });

  it('no file of the report service names a fitting function', () => {
    const dir = path.resolve(__dirname, '../../services/report/src');
    const files = fs.readdirSync(dir, { recursive: true, encoding: 'utf8' }).filter((f) => f.endsWith('.ts'));
    expect(files.length).toBeGreaterThan(10);
    const fitting = files.filter((f) => /\b(fitCurves|fitPoints|fitPolynomial|fitForestType)\b/.test(fs.readFileSync(path.join(dir, f), 'utf8')));
    expect(fitting).toEqual([]);
  });

  it('draws what was stored: a stored chart changed behind the job shows on the page, drawn once', async () => {
    await summaries();
    const before = await latest('Greyridge');
    await page('Greyridge');
    await s.db.query(`update fit_charts set chart = jsonb_set(chart, '{n}', '999') where forest_type = 'wet'`);
    await markStale(s.db, 'summary', ['Greyridge']);
    spies.render = 0;
    await summaries();
    expect(spies.render).toBe(0);
    const after = await latest('Greyridge');
    expect(after.version).toBe(before.version + 1);
    expect(JSON.stringify(after.payload.charts.fits[0].spec)).toContain('n = 999');
    expect(await page('Greyridge')).toContain('n = 999');
    expect(spies.render).toBe(1); // the changed chart only: the means and guild charts are the same pictures, kept
  });

  it('stores no new version when no chart (nor anything else) changed', async () => {
    await markStale(s.db, 'summary', ['Fernhollow']);
    await summaries();
    const before = await latest('Fernhollow');
    await markStale(s.db, 'summary', ['Fernhollow']);
    await summaries();
    const after = await latest('Fernhollow');
    expect(after.version).toBe(before.version); // same content: no new version
    expect(after.payload.charts).toEqual(before.payload.charts);
    expect(spies.render).toBe(0);
  });

  it('says why a forest type has no chart when no fit of it is stored', async () => {
    await s.db.query(`delete from fit_charts where forest_type = 'wet'`);
    await markStale(s.db, 'summary', ['Fernhollow']);
    await summaries();
    const chart = (await latest('Fernhollow')).payload.charts.fits[0];
    expect(chart).toMatchObject({ forest_type: 'wet', spec: null, points: 0 });
    expect(chart.missing).toMatch(/no stored fit of fisher_alpha against disturbance_index for wet/);
    expect(await page('Fernhollow')).toContain('No chart for wet: no stored fit of fisher_alpha against disturbance_index for wet');
    expect(spies.fitCurves).toBe(0);
  });
});
