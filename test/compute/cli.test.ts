import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runMain } from '../support/cli';
import type { ServiceDeps } from '@stemwise/core';
import { BullQueue } from '@stemwise/platform/bullmq';
import { createProcessors } from '@stemwise/compute';
import { fixtureSpecies, generateInventory, loadInventory, loadSpecies } from './fixtures';
import { standInSummaries } from './support';
import { envFor, testLogger, useServices, type TestServices } from '../support/services';

const run = promisify(execFile);
const BIN = path.resolve(__dirname, '../../bin/stemwise.mjs');

async function stemwise(args: string[], env: Record<string, string | undefined>) {
  try {
    const r = await run(process.execPath, [BIN, ...args], { env: env as NodeJS.ProcessEnv, timeout: 90_000 });
    return { code: 0, stdout: r.stdout, stderr: r.stderr };
  } catch (err) {
    const e = err as { code: number; stdout: string; stderr: string };
    return { code: e.code, stdout: e.stdout, stderr: e.stderr };
  }
}

// `stemwise recompute` and `stemwise export` as a user runs them, on PostgreSQL, with and without
// Redis: one real process (bin/stemwise.mjs), the rest through main() in this process (quicker).
describe('stemwise recompute and export', () => {
  let s: TestServices;
  const out = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-export-'));
  const noRedis = () => ({ ...envFor(s), REDIS_URL: undefined, STEMWISE_BOOTSTRAP: '50' });
  const inProcess = (args: string[], env: Record<string, string | undefined> = noRedis()) => runMain(args, env);

  beforeAll(async () => {
    s = await useServices();
    await loadSpecies(s.db, fixtureSpecies());
  });
  afterAll(async () => {
    await s?.cleanup();
    fs.rmSync(out, { recursive: true, force: true });
  });

  const inventory = () => generateInventory({ seed: 2, plotsPerCell: 2, stemsPerPlot: 30 });
  let computed = false;
  /** The inventory loaded and recomputed, as the recompute test leaves it: done here when a test runs without it (vitest -t). */
  async function recomputed(): Promise<void> {
    if (computed) return;
    await loadInventory(s.db, inventory());
    const r = await inProcess(['recompute']);
    expect(r.code, r.stderr).toBe(0);
    computed = true;
  }

  it('says "nothing stale" when there is nothing to do', async () => {
    const r = await inProcess(['recompute']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('nothing stale\n');
  });

  it('recomputes in-process without REDIS_URL and prints what ran', async () => {
    await loadInventory(s.db, inventory());
    const r = await stemwise(['recompute'], noRedis());
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^run \S+ \(manual\): (done|running)\n/);
    expect(r.stdout).toMatch(/plot metrics: \d+ plot visits, \d+ stems, 1 chunk/);
    expect(r.stdout).toMatch(/fits wet: (hump|increasing|decreasing|u_shape|none) \(n = \d+/);
    // How long each stage took, with its counts, from what the stages recorded in the run's details.
    const [{ visits, stems }] = await s.db.query<{ visits: number; stems: number }>(`select (select count(*)::int from plot_visits) visits, (select count(*)::int from stems) stems`);
    const times = r.stdout.slice(r.stdout.indexOf('stage times (wall clock):\n')).trimEnd().split('\n');
    expect(times.map((l) => l.trim().split(/\s{2,}/)[0])).toEqual(['stage times (wall clock):', 'plan', 'plot metrics', 'fits', 'summaries', 'total']);
    expect(times[1]).toMatch(new RegExp(`^  plan +\\d+\\.\\d\\d s  ${visits} plot visits in 1 chunk, \\d+ height models? checked$`));
    expect(times[2]).toMatch(new RegExp(`^  plot metrics +\\d+\\.\\d\\d s  ${visits} plot visits, ${stems} stems, 1 chunk \\(\\d+\\.\\d\\d s of chunk work\\)$`));
    expect(times[3]).toMatch(/^  fits +\d+\.\d\d s  \d+ forest types?$/);
    expect(times[4]).toMatch(/^  summaries +\d+\.\d\d s  \d+ regions?, \d+ new versions?$/);
    const secs = times.slice(1).map((l) => Number(/(\d+\.\d\d) s/.exec(l)![1]));
    expect(secs[4]).toBeGreaterThanOrEqual(Math.max(...secs.slice(0, 4))); // the total spans them all
    const [{ stages }] = await s.db.query<{ stages: Record<string, { start: number; ms: number }> }>(`select details->'stages' stages from recompute_runs order by started_at desc limit 1`);
    const order = ['plan', 'metrics', 'fits', 'summaries'].map((k) => stages[k]);
    for (let i = 1; i < order.length; i++) expect(order[i].start).toBeGreaterThanOrEqual(order[i - 1].start + order[i - 1].ms); // one after another
    const [{ stale }] = await s.db.query<{ stale: number }>(`select count(*)::int stale from plot_visits where stale`);
    expect(stale).toBe(0);
    computed = true;
  });

  it('writes export plots to a file, complete, and reports the row count on stderr', async () => {
    await recomputed();
    const file = path.join(out, 'plots.csv');
    const r = await inProcess(['export', 'plots', '--out', file]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toBe('');
    const lines = fs.readFileSync(file, 'utf8').trim().split('\n');
    expect(lines[0]).toMatch(/^plot_id,survey_date,region,forest_type,stems_ha,/);
    expect(r.stderr).toBe(`stemwise: ${lines.length - 1} rows written to ${file}\n`);
    expect(fs.readdirSync(out)).toEqual(['plots.csv']); // no partial file left behind
    const nowhere = await inProcess(['export', 'plots', '--out', path.join(out, 'missing', 'plots.csv')]);
    expect(nowhere.code).toBe(1);
    expect(nowhere.stderr).toMatch(/^stemwise: cannot write .*plots\.csv: the folder .*missing does not exist\n$/);
  });

  it('says so when export change has no rows because no plot was measured twice', async () => {
    const empty = await useServices();
    try {
      const r = await runMain(['export', 'change'], { ...envFor(empty), REDIS_URL: undefined });
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout.trim().split('\n')).toHaveLength(1); // the header only
      expect(r.stderr).toMatch(/no plot has two computed visits yet/);
    } finally {
      await empty.cleanup();
    }
  });

  it('writes export fits and GeoJSON to stdout, data only', async () => {
    await recomputed();
    const fits = await inProcess(['export', 'fits', '--format', 'json', '--axis', 'fire_score', '--metric', 'richness']);
    expect(fits.code, fits.stderr).toBe(0);
    const rows = JSON.parse(fits.stdout);
    expect(rows).toHaveLength(6);
    expect(rows[0].axis).toBe('fire_score');
    const regions = await inProcess(['export', 'regions']); // the report service's export, behind the same command
    expect(regions.code, regions.stderr).toBe(0);
    expect(regions.stdout).toMatch(/^region,forest_type,variable,n_plots,mean,se,ci_low,ci_high,sampling_error_pct,forest_area_ha,total,caution_flag,whole_se,whole_ci_low,whole_ci_high,total_whole_ci_low,total_whole_ci_high\n/);
    const gj = await inProcess(['export', 'plots', '--format', 'geojson', '--region', 'Sallowfen']);
    expect(gj.code, gj.stderr).toBe(0);
    expect(JSON.parse(gj.stdout).features.every((f: { properties: { region: string } }) => f.properties.region === 'Sallowfen')).toBe(true);
  });

  it('answers bad arguments with a usage error (exit 2) that says what is valid', async () => {
    const axis = await inProcess(['export', 'fits', '--axis', 'disturbance']);
    expect(axis.code).toBe(2);
    expect(axis.stderr).toMatch(/^stemwise: unknown axis 'disturbance'; choose one of: stems_ha, basal_area_m2_ha, .*, disturbance_index(, [a-z0-9_]+)*\n$/);
    const format = await inProcess(['export', 'plots', '--format', 'xml']);
    expect(format.code).toBe(2);
    expect(format.stderr).toMatch(/--format must be one of csv, json, geojson/);
    expect((await inProcess(['export', 'trees'])).code).toBe(2);
    expect((await inProcess(['export', 'fits', '--region', 'Sallowfen'])).code).toBe(2);
    expect((await inProcess(['recompute', '--soon'])).code).toBe(2);
    const region = await inProcess(['export', 'plots', '--region', 'Atlantis']);
    expect(region.code).toBe(1);
    expect(region.stderr).toMatch(/^stemwise: no region named 'Atlantis'/);
  });

  it('with REDIS_URL queues the planner job, or with --now plans and waits for the workers', async () => {
    await recomputed();
    const queued = await inProcess(['recompute', '--all'], envFor(s, { STEMWISE_BOOTSTRAP: '50' }));
    expect(queued.code, queued.stderr).toBe(0);
    const jobId = /^queued (recompute\.manual\.\d{17}) /.exec(queued.stdout)?.[1];
    expect(jobId).toBeDefined();
    const queue = await BullQueue.open({ url: s.redisUrl, prefix: s.prefix, attempts: 1, log: testLogger() });
    try {
      expect(await queue.state(jobId!, 'maintenance.recompute')).toBe('waiting');
      // Workers of this test (compute + a stand-in for the report service) serve the queues.
      const deps: ServiceDeps = { config: s.config, db: s.db, log: testLogger(), queue };
      await queue.work({ ...createProcessors(deps), ...standInSummaries(s.db) }, { queues: ['compute', 'report'] });
      const now = await inProcess(['recompute', '--now', '--all'], envFor(s, { STEMWISE_BOOTSTRAP: '50' }));
      expect(now.code, now.stderr).toBe(0);
      expect(now.stderr).toMatch(/plot metrics done\n[\s\S]*fits done\n[\s\S]*summaries done\n/);
      expect(now.stdout).toMatch(/^run \S+ \(manual\): done\n/);
    } finally {
      await queue.close();
    }
  });
});
