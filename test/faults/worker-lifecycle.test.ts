import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getBatch } from '@stemwise/db';
import { generateInventory } from '@stemwise/demo-inventory';
import { filesInDir, submitBatch } from '@stemwise/core';
import type { BullQueue } from '@stemwise/platform/bullmq';
import { loadInventory } from '../compute/fixtures';
import { createToken } from '../report/tokens';
import { envFor, testLogger, useServices, type TestServices } from '../support/services';
import { FAULT_ENV, faultInventory, latestRun, openBull, seedInventory } from './pipeline';
import { freePort, runStemwise, sleep, startWorker, stopAll, until, type StemwiseProcess } from './processes';

// How workers stop, retry and give up, with real `serve` processes. A chunk job is held "in progress"
// deterministically by a row lock the test takes on one of its plot visits (the chunk waits for it).
describe('worker lifecycle', () => {
  let s: TestServices;
  let queue: BullQueue;
  let env: Record<string, string>;
  let port: number;
  const storage = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-lifecycle-'));
  let handOver: StemwiseProcess; // the compute worker started while the first one stops
  const lockClients: pg.Client[] = [];

  /** Holds a row lock on a plot visit until released: a chunk computing it waits. */
  async function lockVisit(visitId: number): Promise<{ release(): Promise<void> }> {
    const client = new pg.Client({ connectionString: s.databaseUrl });
    client.on('error', () => {}); // the database is dropped under it if a test fails while holding the lock
    lockClients.push(client);
    await client.connect();
    await client.query('begin');
    await client.query('select id from plot_visits where id = $1 for update', [visitId]);
    return {
      async release() {
        await client.query('commit');
      },
    };
  }
  const firstStaleVisit = async () => (await s.db.query<{ id: string }>(`select min(id) id from plot_visits where stale`))[0].id;
  const staleCount = async () => (await s.db.query<{ n: number }>(`select count(*)::int n from plot_visits where stale`))[0].n;
  const runDone = (runId: string) =>
    until(`run ${runId} done`, async () => (await s.db.query<{ state: string }>(`select state from recompute_runs where id = $1`, [runId]))[0]?.state === 'done', 60_000);
  /** The one chunk of the latest run once it is in progress. */
  async function activeChunk(after: string | null): Promise<{ runId: string; chunk: string }> {
    const run = await until('a new run', async () => {
      const r = await latestRun(s.db);
      return r && r.id !== after ? r : null;
    }, 60_000);
    const chunk = `chunk.${run.id}.0`;
    await until(`${chunk} active`, async () => (await queue.state(chunk, 'compute.plot-chunk')) === 'active', 30_000, 20);
    await sleep(300); // inside its transaction, waiting for the lock
    return { runId: run.id, chunk };
  }

  /**
   * The worker the first test hands over to, once it has computed the seeded plots: started here when a
   * test runs without the first one (vitest -t).
   */
  async function handOverWorker(): Promise<void> {
    if (handOver) return;
    handOver = await startWorker('compute', { ...env, STEMWISE_STOP_GRACE_SECONDS: '1' }, 'compute (hands back)');
    await runDone((await until('a run', () => latestRun(s.db), 60_000)).id);
  }

  beforeAll(async () => {
    s = await useServices(FAULT_ENV);
    port = await freePort();
    env = envFor(s, { ...FAULT_ENV, STEMWISE_CHUNK_PLOTS: '200', STEMWISE_PORT: String(port), STEMWISE_STORAGE_DIR: storage });
    await seedInventory(s.db, faultInventory(3));
    queue = await openBull(s.redisUrl, s.prefix);
    await startWorker('report', env);
  }, 120_000);
  afterAll(async () => {
    await stopAll();
    await Promise.all(lockClients.map((c) => c.end().catch(() => {})));
    await queue?.close();
    await s?.cleanup();
    fs.rmSync(storage, { recursive: true, force: true });
  });

  it('on SIGTERM lets the job in progress finish, then exits 0', async () => {
    const lock = await lockVisit(Number(await firstStaleVisit()));
    // Its start-up reconcile finds the stale visits and queues their recompute; the chunk waits for the lock.
    const worker = await startWorker('compute', { ...env, STEMWISE_STOP_GRACE_SECONDS: '60' }, 'compute (finishes)');
    const { runId, chunk } = await activeChunk(null);
    const stopping = worker.stop('SIGTERM', 30_000);
    const next = startWorker('compute', { ...env, STEMWISE_STOP_GRACE_SECONDS: '1' }, 'compute (hands back)');
    await sleep(1500);
    expect(worker.running).toBe(true); // still finishing its job
    await lock.release();
    const exit = await stopping;
    expect(exit).toMatchObject({ code: 0, signal: null });
    expect(exit.ms).toBeLessThan(15_000);
    expect(await queue.state(chunk, 'compute.plot-chunk')).toBe('completed');
    expect(worker.stderr).toMatch(/stemwise: stopped\n/);
    handOver = await next;
    await runDone(runId); // the next stages ran on the other worker
    expect(await staleCount()).toBe(0);
  });

  it('hands back a job that outlasts the grace time; another worker retries it with backoff and completes it', async () => {
    await handOverWorker();
    const previous = (await latestRun(s.db))!.id;
    await loadInventory(s.db, faultInventory(1, { seed: 29, prefix: 'Q' }));
    const lock = await lockVisit(Number(await firstStaleVisit()));
    await queue.add({ name: 'maintenance.recompute', data: { trigger: 'manual', all: false }, jobId: 'recompute.manual.handback' });
    const { runId, chunk } = await activeChunk(previous);
    const exit = await handOver.stop('SIGTERM', 15_000);
    expect(exit).toMatchObject({ code: 0, signal: null });
    expect(exit.ms).toBeLessThan(8000); // 1 s of grace, then hand back and close
    expect(handOver.stderr).toContain(`handed back ${chunk}`);
    expect(await queue.state(chunk, 'compute.plot-chunk')).toBe('waiting');

    // A worker whose lock waits time out after 0.7 s: while the row stays locked each attempt fails and is retried with backoff.
    const url = `${s.databaseUrl}?options=${encodeURIComponent('-c lock_timeout=700')}`;
    const retrying = await startWorker('compute', { ...env, DATABASE_URL: url }, 'compute (retries)');
    const failures = () => retrying.logLines().filter((l) => l.jobId === chunk && l.msg === 'job will be retried');
    await until('two failed attempts of the chunk', async () => failures().length >= 2, 30_000);
    await lock.release();
    await runDone(runId);
    expect(await staleCount()).toBe(0);
    const [a, b] = failures();
    expect(a).toMatchObject({ attempt: 1, retryInMs: 1000, reason: expect.stringMatching(/lock timeout/) });
    expect(b).toMatchObject({ attempt: 2, retryInMs: 2000 });
    expect(Number(b.time) - Number(a.time)).toBeGreaterThanOrEqual(1000); // waited out the backoff before trying again
    expect(await queue.state(chunk, 'compute.plot-chunk')).toBe('completed');
  });

  it('sends a job that keeps failing to the failed state, with its reason in batch show and the API', async () => {
    const dir = path.join(storage, 'upload');
    await generateInventory({ outDir: dir, plots: 3, seed: 8 });
    fs.rmSync(path.join(dir, 'truth.json'));
    // Queued with 3 attempts (the producer's STEMWISE_JOB_ATTEMPTS decides, whatever the worker's says).
    const producer = await openBull(s.redisUrl, s.prefix, 3);
    let batchId: string;
    try {
      ({ batchId } = await submitBatch({ config: { ...s.config, storageDir: storage }, db: s.db, log: testLogger(), queue: producer }, filesInDir(dir), {}, 'test'));
    } finally {
      await producer.close();
    }
    // The stored trees file becomes unreadable (a directory in its place): every attempt fails the same way.
    const stored = (await getBatch(s.db, batchId))!.files.find((f) => f.kind === 'trees')!.stored;
    const file = path.join(storage, batchId, stored);
    fs.rmSync(file);
    fs.mkdirSync(file);

    const ingest = await startWorker('ingest', env);
    // The processor marks the batch failed on its last try; BullMQ then moves the job to failed and the worker logs it.
    await until('the batch and its job failed', async () => (await getBatch(s.db, batchId))?.state === 'failed' && (await queue.state(`ingest.${batchId}`, 'ingest.batch')) === 'failed', 30_000);
    const ofJob = () => ingest.logLines().filter((l) => l.jobId === `ingest.${batchId}`);
    await until('the failure in the worker log', async () => ofJob().some((l) => l.msg === 'job failed'), 5000);
    const lines = ofJob();
    expect(lines.filter((l) => l.msg === 'job will be retried').map((l) => l.retryInMs)).toEqual([1000, 2000]);
    expect(lines.filter((l) => l.msg === 'job failed')).toHaveLength(1);

    const show = await runStemwise(['batch', 'show', batchId], env);
    expect(show.code).toBe(0);
    expect(show.stdout).toMatch(new RegExp(`batch ${batchId}: failed \\(.*EISDIR`));

    const token = await createToken(s.db, 'admin');
    const res = await fetch(`http://127.0.0.1:${port}/v1/batches/${batchId}`, { headers: { authorization: `Bearer ${token.token}` } });
    expect(res.status).toBe(200);
    const body = (await res.json()) as { state: string; failureReason: string };
    expect(body.state).toBe('failed');
    expect(body.failureReason).toMatch(/EISDIR/);
  });
});
