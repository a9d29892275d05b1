import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { reconcile, type ServiceDeps } from '@stemwise/core';
import type { BullQueue } from '@stemwise/platform/bullmq';
import { envFor, testLogger, useServices, type TestServices } from '../support/services';
import { resultsDigest, type ResultsDigest } from './checksum';
import { FAULT_ENV, faultInventory, latestRun, openBull, seedInventory, undisturbedDigest, visitCount } from './pipeline';
import { startPrivateRedis, type PrivateRedis } from './private-redis';
import { freePort, sleep, startWorker, stopAll, until, type StemwiseProcess } from './processes';

// Redis only carries work: when it loses every key in the middle of a recompute, the run's remaining
// jobs are gone, but PostgreSQL still says which visits are stale. The reconciler finds the run whose
// jobs vanished, queues the recompute again, and the results equal those of an undisturbed run.
describe('Redis flushed in the middle of a recompute', () => {
  const plots = faultInventory(20);
  const visits = visitCount(plots);
  let s: TestServices;
  let redis: PrivateRedis;
  let queue: BullQueue;
  let baseline: ResultsDigest;
  const workers: StemwiseProcess[] = [];

  beforeAll(async () => {
    [baseline, s, redis] = await Promise.all([undisturbedDigest(plots), useServices(FAULT_ENV), startPrivateRedis()]);
    const env = envFor(s, { ...FAULT_ENV, REDIS_URL: redis.url, STEMWISE_CHUNK_PLOTS: '4', STEMWISE_COMPUTE_CONCURRENCY: '1', STEMWISE_PORT: String(await freePort()) });
    workers.push(...(await Promise.all([startWorker('compute', env), startWorker('report', env)])));
    // Loaded after the workers started, so their start-up reconcile finds nothing and the test starts the run.
    await seedInventory(s.db, plots);
    queue = await openBull(redis.url, s.prefix);
  });
  afterAll(async () => {
    await stopAll();
    await queue?.close();
    await redis?.stop();
    await s?.cleanup();
  });

  it('loses the queued chunks, and the reconciler restores the work to the same results', async () => {
    await queue.add({ name: 'maintenance.recompute', data: { trigger: 'manual', all: false }, jobId: 'recompute.manual.fault' });
    const interrupted = await until('some chunks of the run done', async () => {
      const run = await latestRun(s.db);
      return run && run.chunksDone >= 2 ? run : null;
    }, 30_000, 10);
    await redis.flushAll();

    // The jobs are gone; what the chunk in progress wrote stays, the rest stays stale.
    await sleep(1000);
    const stuck = await latestRun(s.db);
    expect(stuck!.id).toBe(interrupted.id);
    expect(stuck!.state).toBe('running');
    expect(stuck!.chunksDone).toBeLessThan(stuck!.chunksPlanned!);
    const [{ stale }] = await s.db.query<{ stale: number }>(`select count(*)::int stale from plot_visits where stale`);
    expect(stale).toBeGreaterThan(0);
    expect(stale).toBeLessThan(visits);
    expect(await queue.schedules()).toEqual([]); // the nightly schedule went with the rest
    const partial = await resultsDigest(s.db);
    expect(partial.digests.plotMetrics).not.toBe(baseline.digests.plotMetrics);

    const deps: ServiceDeps = { config: s.config, db: s.db, log: testLogger(), queue };
    const report = await reconcile(deps);
    expect(report.runsAbandoned).toEqual([interrupted.id]);
    expect(report.recomputeQueued).toBe(true);
    expect(report.schedulesRegistered).toEqual(['nightly-recompute']);

    const finished = await until('a new run done with nothing stale', async () => {
      const run = await latestRun(s.db);
      const [{ due }] = await s.db.query<{ due: boolean }>(`select exists(select 1 from plot_visits where stale) or exists(select 1 from stale_work) due`);
      return run && run.id !== interrupted.id && run.state === 'done' && !due ? run : null;
    }, 60_000);
    expect(finished.trigger).toBe('reconcile');
    const [abandoned] = await s.db.query<{ state: string; reason: string }>(`select state, details->>'reason' reason from recompute_runs where id = $1`, [interrupted.id]);
    expect(abandoned).toEqual({ state: 'failed', reason: 'its jobs were lost from the queue' });

    const digest = await resultsDigest(s.db);
    expect(digest.counts.plotMetrics).toBe(visits);
    expect(digest).toEqual(baseline);
  }, 120_000);
});
