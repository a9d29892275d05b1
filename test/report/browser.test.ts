import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { markStale } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { createProcessors, startReportServer } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { jobContext, seedRun } from './fixture';
import { seedScenario } from './seed-scenario';
import { createToken } from './tokens';

// The report pages served on localhost by a real listen, opened in Debian's headless Chromium: the
// index, a region page, a plot page and the national page, on screen and in the print view.

const CHROMIUM = '/usr/bin/chromium';
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

let s: TestServices;
let server: Awaited<ReturnType<typeof startReportServer>>;
let context: BrowserContext;
let token: string;
let profile: string;
let adminToken: string;
const shots = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-page-'));

/** A second, earlier visit of NV-W1 with its change to the seeded one, more stems and the biomass diagnostics (invented). */
async function seedPlotHistory(db: TestServices['db']): Promise<void> {
  const [latest] = await db.query<{ id: number; plot_id: number; batch_id: string }>(
    `select v.id, v.plot_id, v.batch_id from plot_visits v join plots p on p.id = v.plot_id where p.plot_key = 'NV-W1'`,
  );
  const [{ id: earlier }] = await db.query<{ id: number }>(
    `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, logging_class, fire_class, stale) values ($1, '2020-11-02', $2, 0.1, 1, 0, false) returning id`,
    [latest.plot_id, latest.batch_id],
  );
  await db.query(`insert into plot_metrics (visit_id, stems_ha, basal_area_m2_ha, agb_mg_ha, carbon_mg_ha, richness, disturbance_index) values ($1, 380, 18.5, 176, 82.7, 11, 0.15)`, [earlier]);
  const diagnostics = {
    woodDensityBaShare: { species: 0.8, genus: 0.1, family: 0, plot: 0.1, default: 0 },
    heightSourceShare: { measured: 0.25, modelled: 0.75, noHeightModel: 0 },
    modelledOutsideFitRange: 0,
    liveStemsBelowDbhMin: 0,
    unresolvedNames: [],
  };
  await db.query(`update plot_metrics set diagnostics = $2::jsonb where visit_id = $1`, [latest.id, JSON.stringify(diagnostics)]);
  const more: Array<[string, string, number, string, string | null]> = [
    ['t3', 'Velox primus', 12, 'live', null],
    ['t4', 'Velox primus', 35, 'live', null],
    ['t5', 'Lumenia alta', 48, 'live', null],
    ['t6', 'Arborea lucida', 105, 'live', null],
    ['t7', 'Velox primus', 22, 'dead', null],
    ['t8', 'Lumenia alta', 40, 'stump', 'logged'],
  ];
  for (const [tree, species, dbh, status, cause] of more) {
    await db.query(`insert into stems (visit_id, tree_id, species, dbh_cm, status, stump_cause) values ($1, $2, $3, $4, $5, $6)`, [latest.id, tree, species, dbh, status, cause]);
  }
  await db.query(
    `insert into plot_change (plot_id, visit_from_id, visit_to_id, years, dbh_threshold_cm, n_start, n_survivors, n_died, n_removed, n_recruits,
                              mortality_annual, recruitment_annual, dbh_increment_cm_yr, ba_change_m2_ha_yr, agb_growth_mg_ha_yr, agb_recruitment_mg_ha_yr,
                              agb_loss_mg_ha_yr, agb_net_change_mg_ha_yr, carbon_net_change_mg_ha_yr, n_absent, ba_growth_m2_ha_yr, ba_recruitment_m2_ha_yr,
                              ba_loss_m2_ha_yr, agb_died_mg_ha_yr, agb_removed_mg_ha_yr)
     values ($1, $2, $3, 5.0, 10, 38, 35, 2, 1, 5, 0.0165, 0.0268, 0.31, 0.3, 4.1, 0.6, 1.6, 3.1, 1.46, 0, 0.45, 0.05, 0.2, 1.0, 0.6)`,
    [latest.plot_id, earlier, latest.id],
  );
}

/** Size of an element on the page; zero when it is not shown. */
async function sizeOf(page: Page, selector: string): Promise<{ width: number; height: number }> {
  const box = await page.locator(selector).first().boundingBox();
  return { width: box?.width ?? 0, height: box?.height ?? 0 };
}

/** The texts of an SVG (axis titles, legend titles, labels). */
const svgTexts = (page: Page, selector: string): Promise<string[]> => page.locator(`${selector} text`).allTextContents();

/** Where the links of an SVG lead (vega writes xlink:href). */
const svgLinks = (page: Page, selector: string): Promise<string[]> =>
  page.locator(`${selector} a`).evaluateAll((links) => links.map((a) => a.getAttribute('xlink:href') ?? a.getAttribute('href') ?? ''));

/** Records console errors, page errors and failed requests of a page. */
function watch(page: Page): string[] {
  const problems: string[] = [];
  page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('requestfailed', (r) => problems.push(`request failed: ${r.url()}`));
  return problems;
}

/** Screenshots of the page on screen and in the print view; in print the given elements keep a readable size. */
async function shootBothWays(page: Page, name: string, mustPrint: readonly string[]): Promise<void> {
  await page.emulateMedia({ media: 'screen' });
  await page.screenshot({ path: path.join(shots, `${name}.png`), fullPage: true });
  for (const [i, sel] of mustPrint.entries()) await page.locator(sel).first().screenshot({ path: path.join(shots, `${name}-part${i + 1}.png`) });
  // the print view at the width of an A4 page (210 mm at 96 px per inch)
  const screen = page.viewportSize();
  await page.setViewportSize({ width: 794, height: 1123 });
  await page.emulateMedia({ media: 'print' });
  for (const [i, sel] of mustPrint.entries()) {
    const box = await sizeOf(page, sel);
    expect(box.width, `${name}: ${sel} in print`).toBeGreaterThan(250);
    expect(box.height, `${name}: ${sel} in print`).toBeGreaterThan(120);
    await page.locator(sel).first().screenshot({ path: path.join(shots, `${name}-print-part${i + 1}.png`) });
  }
  await page.screenshot({ path: path.join(shots, `${name}-print.png`), fullPage: true });
  const pdf = await page.pdf({ path: path.join(shots, `${name}.pdf`), format: 'A4' });
  expect(pdf.length, `${name}.pdf`).toBeGreaterThan(20_000);
  await page.emulateMedia({ media: 'screen' });
  if (screen) await page.setViewportSize(screen);
}

describe('report pages in a browser', () => {
  beforeAll(async () => {
    if (!fs.existsSync(CHROMIUM)) {
      throw new Error(`the browser test needs Chromium at ${CHROMIUM}: install it with 'apt-get install -y chromium' (.ci/run does this)`);
    }
    s = await useServices();
    const deps: ServiceDeps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedScenario(s.db);
    await seedPlotHistory(s.db);
    await markStale(s.db, 'summary', ['Northvale', 'Southmere']);
    await createProcessors(deps)['report.summaries']!({ runId: await seedRun(s.db) }, jobContext(testLogger()));
    token = (await createToken(s.db, 'reader', ['Northvale'])).token;
    adminToken = (await createToken(s.db, 'admin')).token;
    server = await startReportServer(deps, { host: '127.0.0.1', port: 0 });
    profile = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-chromium-'));
    context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, args: ARGS, headless: true, viewport: { width: 1280, height: 900 } });
  });
  afterAll(async () => {
    console.log(`page screenshots and PDFs in ${shots}`);
    await context?.close();
    await server?.close();
    await s?.cleanup();
    if (profile) fs.rmSync(profile, { recursive: true, force: true });
  });

  it('shows the charts, headline figures with intervals and the cautions, without console errors', async () => {
    const page = await context.newPage();
    const problems = watch(page);

    const response = await page.goto(`${server.url}/regions/Northvale?token=${token}`);
    expect(response?.status()).toBe(200);
    expect(new URL(page.url()).search).toBe(''); // the token left the address bar for a cookie
    await expect.poll(() => page.title()).toContain('Northvale');

    const charts = page.locator('figure svg');
    expect(await charts.count()).toBeGreaterThanOrEqual(4); // means, guilds, a fit chart per forest type (wet, dry)
    for (const id of ['#means-chart svg', '#guild-chart svg', 'figure.fit-chart[data-forest-type="wet"] svg']) {
      const box = await page.locator(id).boundingBox();
      expect(box?.width, id).toBeGreaterThan(200);
      expect(box?.height, id).toBeGreaterThan(100);
    }
    const ba = page.locator('#headline .card[data-variable="reporting_basal_area_m2_ha"]');
    // rounded to the SE's second significant digit (an SE between 1 and 10 here: one decimal), a trailing zero kept
    await expect.poll(() => ba.locator('.value').innerText()).toMatch(/^21\.0 m²\/ha$/);
    expect(await ba.locator('.ci').innerText()).toMatch(/^95 % CI: \d+\.\d – \d+\.\d$/);
    expect(await ba.locator('.se').innerText()).toMatch(/SE \d\.\d$/);
    expect(await ba.locator('.se').innerText()).toMatch(/sampling error: ±\d+\.\d %/);
    expect(await page.locator('.caution').first().innerText()).toMatch(/not a census[\s\S]*national greenhouse-gas reporting method[\s\S]*licensed foresters/);
    expect(await page.locator('#estimates tbody tr').count()).toBeGreaterThan(20);
    // the verdict with its evidence (stored details of seed-scenario.ts), the words of each verdict, no verdict on a model's row
    const evidence = page.locator('#verdict-evidence tr[data-forest-type="wet"][data-scope="all"]');
    expect(await evidence.innerText()).toMatch(/none[\s\S]*-1\.8[\s\S]*0\.400[\s\S]*1\.2 \(outside the range\)[\s\S]*fails[\s\S]*3\.1 \(p 0\.210\)[\s\S]*-0\.8 \(p 0\.640\)[\s\S]*fails \(break at 0\.35\)/);
    expect(await page.locator('#verdict-words dt').allInnerTexts()).toEqual(['hump', 'u shape', 'increasing', 'decreasing', 'none']);
    expect(await page.locator('#fits thead').innerText()).not.toMatch(/verdict/i);
    expect(await page.locator('#fits-left-out').innerText()).toContain('1 plot left out');
    expect(await page.locator('a[href*="format=csv"]').count()).toBe(1);

    // the map: every plot of the region at its coordinates, a link to its page, labelled axes and legend
    expect(await page.locator('#plot-map svg a').count()).toBe(5);
    const mapTexts = await svgTexts(page, '#plot-map svg');
    expect(mapTexts).toEqual(expect.arrayContaining(['Longitude (WGS 84)', 'Latitude (WGS 84)', 'Above-ground biomass (Mg/ha)']));
    expect(mapTexts.some((t) => /^\d+(\.\d+)?° S$/.test(t))).toBe(true);
    // the fit chart's points of this region lead to their plot pages (NV-W1..3 are the wet plots)
    expect((await svgLinks(page, 'figure.fit-chart[data-forest-type="wet"] svg')).sort()).toEqual(['NV-W1', 'NV-W2', 'NV-W3'].map((k) => `/regions/Northvale/plots/${k}`));
    // the plot table: one row per plot, sorted by the server through its heading links
    expect(await page.locator('#plot-table tbody tr').count()).toBe(5);
    await shootBothWays(page, 'northvale', ['#plot-map svg', '#plot-table', '#means-chart svg', '#guild-chart svg', 'figure.fit-chart[data-forest-type="wet"] svg']);
    expect(fs.statSync(path.join(shots, 'northvale.png')).size).toBeGreaterThan(50_000);
    expect(problems).toEqual([]);
  });

  it('sorts the plot table, recolours the map, and opens a plot from the map', async () => {
    const page = await context.newPage();
    const problems = watch(page);
    await page.goto(`${server.url}/regions/Northvale?token=${token}`);
    await page.locator('#plot-table th[data-key="agb_mg_ha"] a').click();
    await page.waitForURL(/sort=agb_mg_ha&dir=desc/);
    expect(await page.locator('#plot-table tbody tr td:first-child').allInnerTexts()).toEqual(['NV-W3', 'NV-W2', 'NV-W1', 'NV-D2', 'NV-D1']);
    expect(await page.locator('#plot-table th[data-key="agb_mg_ha"]').getAttribute('aria-sort')).toBe('descending');
    await page.locator('#plot-table th[data-key="agb_mg_ha"] a').click();
    await page.waitForURL(/dir=asc/);
    expect(await page.locator('#plot-table tbody tr td:first-child').allInnerTexts()).toEqual(['NV-D1', 'NV-D2', 'NV-W1', 'NV-W2', 'NV-W3']);
    await page.locator('#map-variable').selectOption('fisher_alpha');
    await page.locator('#plot-map-section button[type="submit"]').click();
    await page.waitForURL(/colour=fisher_alpha/);
    expect(new URL(page.url()).searchParams.get('sort')).toBe('agb_mg_ha'); // the table keeps its order
    expect(await page.locator('#plot-map').getAttribute('data-variable')).toBe('fisher_alpha');
    expect(await svgTexts(page, '#plot-map svg')).toContain("Fisher's alpha (per plot)");
    const links = await svgLinks(page, '#plot-map svg');
    await page.locator('#plot-map svg a').nth(links.indexOf('/regions/Northvale/plots/NV-D1')).click();
    await page.waitForURL(/\/regions\/Northvale\/plots\/NV-D1$/);
    expect(await page.locator('h1').innerText()).toBe('Plot NV-D1');
    expect(problems).toEqual([]);
  });

  it('shows a plot page: visits, figures with catalogue labels, diameter distribution, species, biomass method, change', async () => {
    const page = await context.newPage();
    const problems = watch(page);
    const response = await page.goto(`${server.url}/regions/Northvale/plots/NV-W1?token=${token}`);
    expect(response?.status()).toBe(200);
    expect(await page.locator('h1').innerText()).toBe('Plot NV-W1');
    expect(await page.locator('#plot-visits tbody tr td:first-child').allInnerTexts()).toEqual(['2020-11-02', '2025-11-04']);
    const agb = page.locator('#plot-figures tr[data-variable="agb_mg_ha"]');
    expect(await agb.innerText()).toMatch(/^Above-ground biomass \(Mg\/ha\)\s+176\s+192$/);
    const axes = await svgTexts(page, '#diameter-chart svg');
    expect(axes).toEqual(expect.arrayContaining(['Diameter class at breast height', 'Stem density (stems/ha)', 'Basal area (m²/ha)']));
    // 7 live stems on 0.1 ha: 12, 20, 20, 20 cm in 10–20 and 20–30, 35, 48 and 105 cm
    expect(await page.locator('#diameter-classes tbody tr td:first-child').allInnerTexts()).toEqual(['10–20 cm', '20–30 cm', '30–40 cm', '40–50 cm', '50–60 cm', '60–70 cm', '70–80 cm', '80–90 cm', '90–100 cm', '≥ 100 cm']);
    expect(await page.locator('#diameter-classes tbody tr:first-child').innerText()).toMatch(/10–20 cm\s+1\s+10\s/);
    const species = await page.locator('#plot-species tbody tr').allInnerTexts();
    expect(species[0]).toMatch(/^Arborea lucida\s+Arborea splendens\s+Lucidaceae\s+shade-tolerant\s+0\.6\s+3\s/); // the synonym counted as its accepted species
    expect(await page.locator('#biomass-method').innerText()).toMatch(/25\.0 % measured[\s\S]*75\.0 % from the local height–diameter model[\s\S]*80\.0 % from the species’ own value/);
    const change = page.locator('#plot-change');
    expect(await change.locator('thead').innerText()).toContain('2020-11-02 → 2025-11-04');
    expect(await change.locator('tr[data-variable="agb_net_change_mg_ha_yr"]').innerText()).toMatch(/^Net biomass change between visits \(Mg\/ha\/yr\)\s+3\.1$/);
    await shootBothWays(page, 'plot-NV-W1', ['#diameter-chart svg']);
    expect(problems).toEqual([]);
    // a plot of another region is not found under this one
    expect((await page.goto(`${server.url}/regions/Northvale/plots/SM-1`))?.status()).toBe(404);
  });

  // The axis titles of the fit charts are catalogue labels, never raw column names.
  it('titles the fit charts\' axes with catalogue labels, not raw column names', async () => {
    const page = await context.newPage();
    await page.goto(`${server.url}/regions/Northvale`);
    const texts = await svgTexts(page, 'figure.fit-chart[data-forest-type="wet"] svg');
    expect(texts.filter((t) => /^[a-z]+(_[a-z0-9]+)+$/.test(t))).toEqual([]);
    expect(texts).toEqual(expect.arrayContaining(["Fisher's alpha (per plot)"]));
  });

  it('lists only the token’s region on the index, and refuses another region', async () => {
    const page = await context.newPage();
    await page.goto(`${server.url}/`);
    const names = await page.locator('#regions tbody td:first-child').allInnerTexts();
    expect(names).toEqual(['Northvale']);
    expect((await svgLinks(page, '#plot-map svg')).sort()).toEqual(['NV-D1', 'NV-D2', 'NV-W1', 'NV-W2', 'NV-W3'].map((k) => `/regions/Northvale/plots/${k}`)); // this region's plots only
    expect((await page.goto(`${server.url}/regions/Southmere/plots/SM-1`))?.status()).toBe(403);
    const other = await page.goto(`${server.url}/regions/Southmere`);
    expect(other?.status()).toBe(403);
    expect(await page.locator('h1').innerText()).toBe('Not for this token');
  });

  it('shows an admin the index with the national figures and the plots of every region, and the national page with its map', async () => {
    const page = await context.newPage();
    const problems = watch(page);
    await page.goto(`${server.url}/?token=${adminToken}`);
    expect(await page.locator('#national').count()).toBe(1);
    expect(await page.locator('#plot-map svg a').count()).toBe(12); // Northvale 5, Southmere 5, Ostmark 2
    await shootBothWays(page, 'index', ['#plot-map svg']);
    const national = await page.goto(`${server.url}/national`);
    expect(national?.status()).toBe(200);
    expect(await page.locator('#plot-map svg a').count()).toBe(12);
    expect(await svgTexts(page, '#plot-map svg')).toEqual(expect.arrayContaining(['Longitude (WGS 84)', 'Latitude (WGS 84)', 'Above-ground biomass (Mg/ha)']));
    await shootBothWays(page, 'national', ['#plot-map svg', '#means-chart svg']);
    expect(problems).toEqual([]);
  });
});
