import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrateDatabase, openDatabase, syncForestTypes, type Db } from '@stemwise/db';
import type { BullQueue } from '@stemwise/platform/bullmq';
import { loadConfig } from '@stemwise/platform';
import { resultsDigest, type ResultsDigest } from './checksum';
import { FAULT_ENV, faultInventory, latestRun, openBull, seedInventory, undisturbedDigest, visitCount } from './pipeline';
import { startPrivatePostgres, type PrivatePostgres } from './private-postgres';
import { startPrivateRedis, type PrivateRedis } from './private-redis';
import { freePort, startWorker, stopAll, until, type StemwiseProcess } from './processes';

// PostgreSQL restarted (every connection cut) while compute and report workers are in the middle of
// a recompute: the jobs that hit the outage fail, are retried with backoff, reconnect, and the run
// completes once, with the results of an undisturbed run.
describe('PostgreSQL restarted while workers run', () => {
  const plots = faultInventory(20);
  const PREFIX = 'stemwise-pgfault';
  let server: PrivatePostgres;
  let redis: PrivateRedis;
  let db: Db;
  let queue: BullQueue;
  let baseline: ResultsDigest;
  let port: number;
  const workers: StemwiseProcess[] = [];

  beforeAll(async () => {
    [baseline, server, redis, port] = await Promise.all([undisturbedDigest(plots), startPrivatePostgres(), startPrivateRedis(), freePort()]);
    const env = { ...process.env, ...FAULT_ENV, DATABASE_URL: server.url, REDIS_URL: redis.url, STEMWISE_QUEUE_PREFIX: PREFIX, STEMWISE_LOG_LEVEL: 'warn', STEMWISE_CHUNK_PLOTS: '4', STEMWISE_COMPUTE_CONCURRENCY: '2', STEMWISE_PORT: String(port) };
    const config = loadConfig(env);
    db = await openDatabase(config, { poolSize: 3 });
    await migrateDatabase(db);
    await syncForestTypes(db, config.forestTypes);
    workers.push(...(await Promise.all([startWorker('compute', env), startWorker('report', env)])));
    await seedInventory(db, plots);
    queue = await openBull(redis.url, PREFIX);
  }, 120_000);
  afterAll(async () => {
    await stopAll();
    await queue?.close();
    await db?.close().catch(() => {});
    await redis?.stop();
    await server?.stop();
  });

  it('reconnects after the restart; the run completes once, nothing lost or doubled', async () => {
    await queue.add({ name: 'maintenance.recompute', data: { trigger: 'manual', all: false }, jobId: 'recompute.manual.pgfault' });
    const interrupted = await until('some chunks of the run done', async () => {
      const run = await latestRun(db);
      return run && run.chunksDone >= 2 ? run : null;
    }, 30_000, 10);
    const { ms } = await server.restart();
    expect(ms).toBeLessThan(30_000);
    const afterRestart = await latestRun(db);
    expect(afterRestart!.chunksDone).toBeLessThan(afterRestart!.chunksPlanned!); // the restart did land mid-run

    const done = await until('the run done with nothing stale', async () => {
      const run = await latestRun(db);
      const [{ due }] = await db.query<{ due: boolean }>(`select exists(select 1 from plot_visits where stale) or exists(select 1 from stale_work) due`);
      return run && run.state === 'done' && !due ? run : null;
    }, 90_000, 200);
    expect(done.id).toBe(interrupted.id); // the same run finished: nothing was planned twice

    // Jobs failed on the lost connections and were retried; both workers are still up and ready again.
    const failedAttempts = workers.flatMap((w) => w.logLines()).filter((l) => l.msg === 'job attempt failed');
    expect(failedAttempts.length).toBeGreaterThan(0);
    expect(workers.every((w) => w.running)).toBe(true);
    const ready = await fetch(`http://127.0.0.1:${port}/readyz`);
    expect(ready.status).toBe(200);

    const runs = await db.query<{ state: string }>(`select state from recompute_runs`);
    expect(runs).toEqual([{ state: 'done' }]);
    expect(done.chunksDone).toBe(done.chunksPlanned);
    const digest = await resultsDigest(db);
    expect(digest.counts.plotMetrics).toBe(visitCount(plots));
    expect(digest.counts.summaryVersions).toBe(digest.counts.summaryRegions); // one version per region, none doubled
    expect(digest).toEqual(baseline);
  }, 150_000);
});
