import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { markStale } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { createProcessors, startReportServer } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { jobContext, seedRun } from './fixture';
import { seedScenario } from './seed-scenario';
import { createToken } from './tokens';

// A region page served on localhost by a real listen, opened in Debian's headless Chromium.

const CHROMIUM = '/usr/bin/chromium';
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

let s: TestServices;
let server: Awaited<ReturnType<typeof startReportServer>>;
let context: BrowserContext;
let token: string;
let profile: string;
const shots = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-page-'));

describe('region page in a browser', () => {
  beforeAll(async () => {
    if (!fs.existsSync(CHROMIUM)) {
      throw new Error(`the browser test needs Chromium at ${CHROMIUM}: install it with 'apt-get install -y chromium' (.ci/run does this)`);
    }
    s = await useServices();
    const deps: ServiceDeps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedScenario(s.db);
    await markStale(s.db, 'summary', ['Northvale', 'Southmere']);
    await createProcessors(deps)['report.summaries']!({ runId: await seedRun(s.db) }, jobContext(testLogger()));
    token = (await createToken(s.db, 'reader', ['Northvale'])).token;
    server = await startReportServer(deps, { host: '127.0.0.1', port: 0 });
    profile = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-chromium-'));
    context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, args: ARGS, headless: true, viewport: { width: 1280, height: 900 } });
  });
  afterAll(async () => {
    await context?.close();
    await server?.close();
    await s?.cleanup();
    if (profile) fs.rmSync(profile, { recursive: true, force: true });
  });

  it('shows the charts, headline figures with intervals and the cautions, without console errors', async () => {
    const page = await context.newPage();
    const problems: string[] = [];
    page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    page.on('requestfailed', (r) => problems.push(`request failed: ${r.url()}`));

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

    const shot = path.join(shots, 'northvale.png');
    await page.screenshot({ path: shot, fullPage: true });
    await page.emulateMedia({ media: 'print' });
    await page.screenshot({ path: path.join(shots, 'northvale-print.png'), fullPage: true });
    const pdf = await page.pdf({ path: path.join(shots, 'northvale.pdf'), format: 'A4' });
    expect(pdf.length).toBeGreaterThan(20_000);
    console.log(`region page screenshots and PDF in ${shots}`);
    expect(fs.statSync(shot).size).toBeGreaterThan(50_000);
    expect(problems).toEqual([]);
  });

  it('lists only the token’s region on the index, and refuses another region', async () => {
    const page = await context.newPage();
    await page.goto(`${server.url}/`);
    const names = await page.locator('#regions tbody td:first-child').allInnerTexts();
    expect(names).toEqual(['Northvale']);
    const other = await page.goto(`${server.url}/regions/Southmere`);
    expect(other?.status()).toBe(403);
    expect(await page.locator('h1').innerText()).toBe('Not for this token');
  });
});
