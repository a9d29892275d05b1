import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadInventory } from '../compute/fixtures';
import type { BullQueue } from '@stemwise/platform/bullmq';
import { envFor, useServices, type TestServices } from '../support/services';
import { FAULT_ENV, faultInventory, latestRun, openBull, recomputeHere, seedInventory, visitCount } from './pipeline';
import { freePort, startWorker, stopAll, until, type StemwiseProcess } from './processes';

// The nightly job through its real path: the schedule two compute workers registered (once), its
// template job run by those workers and a report worker. New plots of a forest type found in one
// region only make exactly their metrics, that type's fits and that region's summary stale; the first
// run recomputes those, in that order, as one flow; the second finds nothing stale and says so.
describe('nightly recompute', () => {
  const FOREST_TYPES = 'wet:wet,moist:moist,dry:dry,swamp:wet';
  const existing = faultInventory(6);
  // New plots of a forest type that only Sallowfen has.
  const added = faultInventory(2, { seed: 23, prefix: 'S' }).map((p) => ({ ...p, forestType: 'swamp', region: 'Sallowfen' }));
  let s: TestServices;
  let queue: BullQueue;
  const computeWorkers: StemwiseProcess[] = [];
  let reportWorker: StemwiseProcess;

  /** What a run could touch: each visit's metrics time, each fit's time, each region's latest summary version. */
  const state = async () => ({
    metrics: await s.db.query<{ plot_key: string; survey_date: string; computed_at: Date }>(
      `select p.plot_key, v.survey_date::text, m.computed_at from plot_metrics m join plot_visits v on v.id = m.visit_id join plots p on p.id = v.plot_id order by 1, 2`,
    ),
    fits: await s.db.query<{ scope: string; forest_type: string; model: string; computed_at: Date }>(`select scope, forest_type, model, computed_at from curve_fits order by 1, 2, 3`),
    summaries: await s.db.query<{ name: string; version: number }>(`select r.name, max(s.version)::int version from region_summaries s join regions r on r.id = s.region_id group by r.name order by 1`),
    runs: (await s.db.query<{ n: number }>(`select count(*)::int n from recompute_runs`))[0].n,
  });
  const logs = () => [...computeWorkers, reportWorker].flatMap((w) => w.logLines());

  beforeAll(async () => {
    s = await useServices({ ...FAULT_ENV, STEMWISE_FOREST_TYPES: FOREST_TYPES });
    await seedInventory(s.db, existing);
    const failures = await recomputeHere(s.config, s.db);
    expect(failures).toEqual([]);
    queue = await openBull(s.redisUrl, s.prefix);
    const env = envFor(s, { ...FAULT_ENV, STEMWISE_FOREST_TYPES: FOREST_TYPES, STEMWISE_CHUNK_PLOTS: '5', STEMWISE_LOG_LEVEL: 'info', STEMWISE_PORT: String(await freePort()) });
    const [a, b, r] = await Promise.all([startWorker('compute', env, 'compute 1'), startWorker('compute', env, 'compute 2'), startWorker('report', env)]);
    computeWorkers.push(a, b);
    reportWorker = r;
  }, 120_000);
  afterAll(async () => {
    await stopAll();
    await queue?.close();
    await s?.cleanup();
  });

  it('is registered once although two compute workers started, for 02:00 in the configured time zone', async () => {
    const schedules = await queue.schedules();
    expect(schedules).toHaveLength(1);
    expect(schedules[0]).toMatchObject({ id: 'nightly-recompute', queue: 'maintenance', name: 'maintenance.recompute', data: { all: false, trigger: 'nightly' }, cron: '0 2 * * *', timezone: 'UTC' });
    expect(schedules[0].next!.getUTCHours()).toBe(2);
    expect(schedules[0].next!.getUTCMinutes()).toBe(0);
    expect(schedules[0].next!.getTime()).toBeGreaterThan(Date.now());
    // One pending run of it in the queue, not one per worker.
    expect((await queue.counts()).maintenance.delayed).toBe(1);
  });

  it('recomputes what new plots made stale: their metrics, the fits of their forest type, the summary of their region, in that order', async () => {
    const before = await state();
    await loadInventory(s.db, added);
    const [nightly] = await queue.schedules();
    await queue.add({ name: 'maintenance.recompute', data: nightly.data as { trigger: 'nightly' }, jobId: 'nightly.test.1' });
    const run = await until('the nightly run done', async () => {
      const r = await latestRun(s.db);
      return r && r.trigger === 'nightly' && r.state === 'done' ? r : null;
    }, 60_000);
    const after = await state();

    // Metrics: the new visits only; the others were not touched.
    expect((run.details.plan as { visits: number }).visits).toBe(visitCount(added));
    const newKeys = new Set(added.map((p) => p.plotKey));
    expect(after.metrics).toHaveLength(before.metrics.length + visitCount(added));
    const old = after.metrics.filter((m) => !newKeys.has(m.plot_key));
    expect(old).toEqual(before.metrics);
    // Fits: swamp's appear; wet, moist and dry were not refitted.
    expect(after.fits.filter((f) => f.forest_type !== 'swamp')).toEqual(before.fits);
    expect(after.fits.some((f) => f.forest_type === 'swamp' && f.scope === 'all')).toBe(true);
    // Summaries: a new version of Sallowfen only.
    expect(after.summaries).toEqual(before.summaries.map((r) => ({ ...r, version: r.name === 'Sallowfen' ? r.version + 1 : r.version })));

    // One flow, in order: every chunk, then the plots stage, then the fits, then the summaries (pino times across the workers).
    // The report worker logs the summaries after it finished the run: wait for that line.
    await until('the summaries in the log', async () => logs().some((l) => l.runId === run.id && l.msg === 'region summaries stored'), 10_000);
    const ofRun = logs().filter((l) => l.runId === run.id);
    const times = (msg: string) => ofRun.filter((l) => l.msg === msg).map((l) => Number(l.time));
    const chunks = times('plot metrics written');
    expect(chunks).toHaveLength(run.chunksPlanned!);
    const [plotsDone] = times('plot metrics stage complete');
    const [fitsDone] = times('fits stored');
    const [summariesDone] = times('region summaries stored');
    expect(Math.max(...chunks)).toBeLessThanOrEqual(plotsDone);
    expect(plotsDone).toBeLessThanOrEqual(fitsDone);
    expect(fitsDone).toBeLessThanOrEqual(summariesDone);
  });

  it('a second nightly run after no new data does nothing and says so in the log', async () => {
    const before = await state();
    const [nightly] = await queue.schedules();
    await queue.add({ name: 'maintenance.recompute', data: nightly.data as { trigger: 'nightly' }, jobId: 'nightly.test.2' });
    await until('the second nightly job completed', async () => (await queue.state('nightly.test.2', 'maintenance.recompute')) === 'completed', 30_000);
    const said = computeWorkers.flatMap((w) => w.logLines()).filter((l) => l.jobId === 'nightly.test.2');
    expect(said).toContainEqual(expect.objectContaining({ msg: 'nothing stale', trigger: 'nightly', jobName: 'maintenance.recompute' }));
    expect(await state()).toEqual(before);
  });
});
