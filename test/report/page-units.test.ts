import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { markStale } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { buildServer, createProcessors } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { jobContext, seedRun } from './fixture';
import { seedScenario } from './seed-scenario';
import { createToken } from './tokens';

// One unit per kind on the pages: shares in percent everywhere, counts apart from shares, and labels
// that say what was computed (a pooled count is not called a stratified estimate).
describe('units and labels on the region pages', () => {
  let s: TestServices;
  let app: FastifyInstance;
  let auth: Record<string, string>;
  const page = async (region: string) => (await app.inject({ url: `/regions/${region}`, headers: auth })).body;
  const table = (body: string, id: string) => new RegExp(`<table id="${id}">(.*?)</table>`, 's').exec(body)![1];

  beforeAll(async () => {
    s = await useServices();
    const deps: ServiceDeps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedScenario(s.db);
    await markStale(s.db, 'summary', ['Northvale', 'Southmere']);
    await createProcessors(deps)['report.summaries']!({ runId: await seedRun(s.db) }, jobContext(testLogger()));
    auth = { authorization: `Bearer ${(await createToken(s.db, 'admin')).token}` };
    app = await buildServer(deps, { summaryCheckMs: 0 });
  });
  afterAll(async () => {
    await app?.close();
    await s?.cleanup();
  });

  it('shows basal-area shares in percent in the estimates table, as in the guild table (every plot of the scenario: pioneer 0.1, shade-tolerant 0.5)', async () => {
    const estimates = table(await page('Northvale'), 'estimates');
    const row = (variable: string) => [...estimates.matchAll(new RegExp(`<tr[^>]*data-variable="${variable}" data-forest-type="all">(.*?)</tr>`, 'gs'))][0][1];
    expect(row('pioneer_ba_share')).toContain('(%)');
    const means = (variable: string) => [...row(variable).matchAll(/<td class="num">([^<]*)/g)].map((m) => m[1]);
    expect(means('pioneer_ba_share')[1]).toBe('10'); // plots, mean, … : the mean is the second number
    expect(means('shade_tolerant_ba_share')[1]).toBe('50');
    const guilds = table(await page('Northvale'), 'guilds');
    expect(guilds).toContain('10.0 %');
  });

  it('keeps plot counts and shares in columns of their own, the whole-region share named for its weights', async () => {
    const north = table(await page('Northvale'), 'disturbance');
    expect(north).toContain('Plots (count)');
    expect(north).toContain('% of its plots');
    expect(north).toContain('% of forest area (stratified)'); // Northvale has forest areas
    expect(north).not.toMatch(/plots? ·/);
    const south = table(await page('Southmere'), 'disturbance');
    expect(south).toContain('% of plots (stratified, plot-count weights)'); // Southmere has none
    expect(south).not.toContain('forest area');
  });

  it('calls the species counts pooled, not stratified', async () => {
    const body = await page('Northvale');
    const species = table(body, 'species');
    expect(species).toContain('Whole region (pooled over all plots)');
    expect(species).toContain('pooled count');
    expect(species).not.toContain('stratified');
    expect(body).toContain('Species recorded (pooled counts)');
  });
});
