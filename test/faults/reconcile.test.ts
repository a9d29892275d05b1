import crypto from 'node:crypto';
import { Redis } from 'ioredis';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { NIGHTLY_SCHEDULE, reconcile, reconcileJobId, type ServiceDeps } from '@stemwise/core';
import { BullQueue } from '@stemwise/platform/bullmq';
import { PermanentError } from '@stemwise/platform';
import { testLogger, useServices, type TestServices } from '../support/services';
import { until } from './processes';

const openBull = (url: string, prefix: string) => BullQueue.open({ url, prefix, attempts: 3, log: testLogger() });

// The reconciler against real PostgreSQL and Redis, without worker processes: what PostgreSQL says is
// due and no queued job covers is queued again under its deterministic id, exactly once.
describe('reconciler', () => {
  let s: TestServices;
  let queue: BullQueue;
  let deps: ServiceDeps;

  const insertBatch = async (state: string) => {
    const id = crypto.randomUUID();
    await s.db.query(`insert into batches (id, state, content_hash, files) values ($1, $2, $3, '[]'::jsonb)`, [id, state, crypto.randomBytes(8).toString('hex')]);
    return id;
  };

  /** Deletes every key of this file's queue prefix. */
  async function dropQueueKeys(): Promise<void> {
    const redis = new Redis(s.redisUrl, { maxRetriesPerRequest: 1 });
    try {
      const keys = await redis.keys(`${s.prefix}:*`);
      if (keys.length) await redis.del(...keys);
    } finally {
      redis.disconnect();
    }
  }

  beforeAll(async () => {
    s = await useServices();
    queue = await openBull(s.redisUrl, s.prefix);
    deps = { config: s.config, db: s.db, log: testLogger(), queue };
  });
  afterAll(async () => {
    await queue?.close();
    await s?.cleanup();
  });
  beforeEach(async () => {
    await s.db.query(`delete from batches; delete from recompute_runs; delete from stale_work`);
  });

  it('queues a received batch whose job is gone, once, under its deterministic id', async () => {
    const id = await insertBatch('received');
    const first = await reconcile(deps);
    expect(first.batchesRequeued).toEqual([id]);
    expect(await queue.state(`ingest.${id}`, 'ingest.batch')).toBe('waiting');
    const second = await reconcile(deps);
    expect(second.batchesRequeued).toEqual([]); // its job is waiting now
  });

  it("marks a batch failed with BullMQ's reason when its job failed but its state says otherwise", async () => {
    const id = await insertBatch('validating');
    const worker = await openBull(s.redisUrl, s.prefix);
    try {
      await worker.work({ 'ingest.batch': async () => Promise.reject(new PermanentError('storage_gone', 'the storage folder is not mounted')) }, { queues: ['ingest'] });
      await queue.add({ name: 'ingest.batch', data: { batchId: id }, jobId: `ingest.${id}` });
      await until('the ingest job failed', async () => (await queue.state(`ingest.${id}`, 'ingest.batch')) === 'failed', 10_000);
    } finally {
      await worker.close();
    }
    const report = await reconcile(deps);
    expect(report.batchesFailed).toEqual([id]);
    const [row] = await s.db.query<{ state: string; failure_reason: string }>(`select state, failure_reason from batches where id = $1`, [id]);
    expect(row).toEqual({ state: 'failed', failure_reason: 'the storage folder is not mounted' });
  });

  it('fails a running run whose jobs are gone and queues one recompute for the stale work, even when two reconcile at once', async () => {
    await s.db.query(`insert into recompute_runs (id, trigger, state) values ('lost-run', 'nightly', 'running')`);
    await s.db.query(`insert into stale_work (kind, key) values ('summary', 'Sallowfen')`);
    const now = new Date();
    const [a, b] = await Promise.all([reconcile(deps, now), reconcile(deps, now)]);
    expect([...a.runsAbandoned, ...b.runsAbandoned]).toEqual(['lost-run']);
    expect(a.recomputeQueued || b.recomputeQueued).toBe(true);
    expect(await queue.state(reconcileJobId(now), 'maintenance.recompute')).toBe('waiting');
    expect((await queue.counts()).maintenance.waiting).toBe(1);
    const [run] = await s.db.query<{ state: string; reason: string }>(`select state, details->>'reason' reason from recompute_runs`);
    expect(run).toEqual({ state: 'failed', reason: 'its jobs were lost from the queue' });
    // A minute later the planner job is still waiting: no second one.
    const later = await reconcile(deps, new Date(now.getTime() + 60_000));
    expect(later.recomputeQueued).toBe(false);
  });

  it('registers the nightly schedule when Redis lost it, and leaves it alone when it is there', async () => {
    await dropQueueKeys(); // what Redis losing its data looks like
    expect(await queue.schedules()).toEqual([]);
    const first = await reconcile(deps);
    expect(first.schedulesRegistered).toEqual([NIGHTLY_SCHEDULE]);
    const [before] = await queue.schedules();
    const again = await reconcile(deps);
    expect(again.schedulesRegistered).toEqual([]);
    const [after] = await queue.schedules();
    expect(after).toEqual(before);
    // A changed setting is applied.
    const moved = await reconcile({ ...deps, config: { ...s.config, nightlyCron: '30 3 * * *' } });
    expect(moved.schedulesRegistered).toEqual([NIGHTLY_SCHEDULE]);
    expect((await queue.schedules())[0]).toMatchObject({ cron: '30 3 * * *', timezone: 'UTC' });
  });
});
