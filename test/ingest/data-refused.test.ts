import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BullQueue } from '@stemwise/platform/bullmq';
import { type ProcessorMap } from '@stemwise/platform';
import { getBatch } from '@stemwise/db';
import { batchReport, submitBatch } from '@stemwise/core';
import { createProcessors, processBatch } from '@stemwise/ingest';
import { testLogger, useServices, type TestServices } from '../support/services';
import { counts, depsFor, PLOTS, STRATA, tempDir, TREES, until, uploadFiles, writeUpload } from './support';

// A value the rules let through but the database refuses (an error of PostgreSQL's classes 22 and
// 23) is the data's fault: the batch fails on its first attempt, naming the file, and is never
// retried. The refusal is a real PostgreSQL error, raised by a trigger this file's database gets.
describe('a value the database refuses while loading', () => {
  let s: TestServices;
  beforeAll(async () => {
    s = await useServices();
    // Two functions: PL/pgSQL would look up the other table's column on every row.
    await s.db.query(`create function refuse_stem() returns trigger language plpgsql as $$
      begin
        if new.tree_id = 'refused' then raise exception 'character with byte sequence 0x00 has no equivalent' using errcode = '22P05'; end if;
        return new;
      end $$`);
    await s.db.query(`create function refuse_stratum() returns trigger language plpgsql as $$
      begin
        if new.forest_area_ha = 4242 then raise exception 'value out of range' using errcode = '22003'; end if;
        return new;
      end $$`);
    await s.db.query(`create trigger refuse_stem before insert on stems for each row execute function refuse_stem()`);
    await s.db.query(`create trigger refuse_stratum before insert on strata for each row execute function refuse_stratum()`);
  });
  afterAll(async () => s?.cleanup());

  it('fails the batch on the first of 5 attempts (BullMQ), naming trees.csv, with nothing loaded', { timeout: 60_000 }, async () => {
    const queue = await BullQueue.open({ url: s.redisUrl, prefix: s.prefix, attempts: 5, log: testLogger() });
    try {
      const deps = depsFor({ ...s.config, storageDir: tempDir('stemwise-storage-'), jobAttempts: 5 }, s.db, queue);
      const before = await counts(s.db);
      const dir = writeUpload({ plots: PLOTS, trees: `${TREES}\nMW-002,refused,Tikka rubra,20.0,,live,,0,0` });
      const { batchId } = await submitBatch(deps, uploadFiles(dir), {}, 'test');
      let runs = 0;
      const ingest = createProcessors(deps)['ingest.batch']!;
      const processors: ProcessorMap = {
        'ingest.batch': (data, ctx) => {
          runs++;
          return ingest(data, ctx);
        },
      };
      await queue.work(processors, { queues: ['ingest'] });
      await until('the ingest job to fail for good', 45_000, async () => (await queue.state(`ingest.${batchId}`, 'ingest.batch')) === 'failed');
      const batch = (await getBatch(s.db, batchId))!;
      expect(runs).toBe(1);
      expect(batch.attempts).toBe(1);
      expect(batch.state).toBe('failed');
      expect(batch.failureReason).toMatch(/^trees\.csv, the 10th stem sent to the database: the database refused a value \(22P05: /);
      expect(await counts(s.db)).toEqual(before);
    } finally {
      await queue.close();
    }
  });

  it('names strata.csv when a stratum is refused', async () => {
    const deps = depsFor({ ...s.config, storageDir: tempDir('stemwise-storage-') }, s.db);
    const before = await counts(s.db);
    const dir = writeUpload({ plots: PLOTS, trees: TREES, strata: `${STRATA}\nLowmere,wet,4242` });
    const { batchId } = await submitBatch(deps, uploadFiles(dir), {}, 'test');
    await expect(processBatch(deps, batchId)).rejects.toThrow(/strata\.csv: the database refused a value \(22003/);
    const report = (await batchReport(s.db, batchId))!;
    expect(report.state).toBe('failed');
    expect(report.attempts).toBe(1);
    expect(report.failureReason).toMatch(/^strata\.csv: /);
    expect(await counts(s.db)).toEqual(before);
  });
});
