import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BullQueue } from '@stemwise/platform/bullmq';
import { getBatch } from '@stemwise/db';
import { generateInventory } from '@stemwise/demo-inventory';
import { submitBatch } from '@stemwise/core';
import { envFor, testLogger, useServices, type TestServices } from '../support/services';
import { tempDir, until, uploadFiles } from './support';

const BIN = path.resolve(__dirname, '../../bin/stemwise.mjs');

function startWorker(env: Record<string, string>, log: string[]): ChildProcess {
  const child = spawn(process.execPath, [BIN, 'serve', 'ingest'], { env, stdio: ['ignore', 'ignore', 'pipe'] });
  child.stderr!.on('data', (d) => log.push(String(d)));
  return child;
}

// A worker process killed with SIGKILL in the middle of loading a batch: nothing of the attempt is
// committed, and once a new worker takes the job again (after BullMQ's lock of the dead worker
// expires, about 30 s) the batch completes with exactly the stems of the files, each once.
describe('an ingest worker killed mid-load', () => {
  let s: TestServices;
  const workers: ChildProcess[] = [];
  beforeAll(async () => void (s = await useServices()));
  afterAll(async () => {
    for (const w of workers) if (w.exitCode === null && w.signalCode === null) w.kill('SIGKILL');
    await s?.cleanup();
  });

  it('leaves nothing behind, and the batch completes after a restart with exact counts', { timeout: 180_000 }, async () => {
    const storageDir = tempDir('stemwise-storage-');
    // A short job lock, so the restarted worker takes the dead worker's job back within seconds.
    const env = envFor(s, { STEMWISE_STORAGE_DIR: storageDir, STEMWISE_JOB_ATTEMPTS: '3', STEMWISE_JOB_LOCK_SECONDS: '5' });
    const out = tempDir();
    const { truth } = await generateInventory({ outDir: out, plots: 300, seed: 5 });
    fs.rmSync(path.join(out, 'truth.json'));
    const stems = truth.counts.stems.rows;
    expect(stems).toBeGreaterThan(100_000);

    const queue = await BullQueue.open({ url: s.redisUrl, prefix: s.prefix, attempts: 3, log: testLogger() });
    let batchId: string;
    try {
      batchId = (await submitBatch({ config: { ...s.config, storageDir }, db: s.db, log: testLogger(), queue }, uploadFiles(out), {}, 'test')).batchId;
    } finally {
      await queue.close();
    }

    const log1: string[] = [];
    const first = startWorker(env, log1);
    workers.push(first);
    const midway = await until('rows being loaded', 60_000, async () => {
      const b = await getBatch(s.db, batchId);
      return b && b.state === 'validating' && b.rowsLoaded > 20_000 && b.rowsLoaded < stems ? b : null;
    });
    first.kill('SIGKILL');
    await new Promise((r) => first.once('exit', r));
    expect(midway.attempts).toBe(1);

    const [{ n: afterKill }] = await s.db.query<{ n: number }>(`select count(*)::int n from stems`);
    expect(afterKill).toBe(0);
    expect((await getBatch(s.db, batchId))!.state).toBe('validating');

    const log2: string[] = [];
    const second = startWorker(env, log2);
    workers.push(second);
    const done = await until('the batch to load after the restart', 150_000, async () => {
      const b = await getBatch(s.db, batchId);
      return b && (b.state === 'loaded' || b.state === 'failed' || b.state === 'rejected') ? b : null;
    });
    expect(done.state, `${done.failureReason} ${log2.join('')}`).toBe('loaded');
    expect(done.attempts).toBe(2);
    expect(done.stemsLoaded).toBe(stems);
    const [row] = await s.db.query<{ n: number; distinct_keys: number; visits: number; plots: number }>(
      `select count(*)::int n, count(distinct (visit_id, tree_id))::int distinct_keys,
              (select count(*)::int from plot_visits) visits, (select count(*)::int from plots) plots from stems`,
    );
    expect(row).toEqual({ n: stems, distinct_keys: stems, visits: truth.counts.plots, plots: truth.counts.plots });

    second.kill('SIGTERM');
    await new Promise((r) => second.once('exit', r));
  });
});
