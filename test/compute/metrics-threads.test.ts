import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { markVisitsStale } from '@stemwise/db';
import { closeMetricsPool, metricsPool } from '@stemwise/compute';
import { fixtureSpecies, generateInventory, loadInventory, loadSpecies } from './fixtures';
import { recomputeInProcess } from './support';
import { useServices, type TestServices } from '../support/services';

// The plot metrics computed in worker threads (STEMWISE_COMPUTE_THREADS) are those of the job's own
// thread, value for value (the demo exports are pinned byte for byte by test/e2e/demo-exports.test.ts,
// which runs with the default threads): same rows, same diagnostics, same unresolved-name counts.
describe('plot metrics in worker threads', () => {
  let s: TestServices;
  // Chunks of 120 visits: two slices of 60 per chunk with two threads, so both threads work on one chunk.
  beforeAll(async () => {
    s = await useServices({ STEMWISE_CHUNK_PLOTS: '120' });
    await loadSpecies(s.db, fixtureSpecies());
    await loadInventory(s.db, generateInventory({ seed: 11, plotsPerCell: 24, stemsPerPlot: 30 }));
  });
  afterAll(async () => {
    await closeMetricsPool();
    await s?.cleanup();
  });

  const stored = async () => ({
    metrics: await s.db.query(`select * from plot_metrics order by visit_id`),
    unresolved: await s.db.query(`select batch_id, name, level, stems from batch_unresolved_names order by batch_id, name`),
    problems: await s.db.query(`select stage, subject, reason from compute_problems order by stage, subject`),
  });
  const normalised = (rows: Awaited<ReturnType<typeof stored>>) => JSON.stringify({ ...rows, metrics: rows.metrics.map(({ computed_at: _, ...r }: Record<string, unknown>) => r) });

  it('gives the same stored rows with no thread and with two', async () => {
    const alone = await recomputeInProcess({ ...s.config, computeThreads: 0 }, s.db, true);
    expect(alone.failures).toEqual([]);
    const inThread = await stored();
    expect(inThread.metrics.length).toBeGreaterThan(240);
    expect(metricsPool(2).started).toBe(0);

    await markVisitsStale(s.db, 'all');
    // Spoilt values, so that equal rows afterwards are rows the threads wrote (the rows stay: the
    // unresolved-name counts are brought up to date from the stored diagnostics).
    await s.db.query(`update plot_metrics set stems_ha = -1, shannon = null`);
    const threaded = await recomputeInProcess({ ...s.config, computeThreads: 2 }, s.db, true);
    expect(threaded.failures).toEqual([]);
    expect(metricsPool(2).started).toBe(2); // both threads ran slices
    expect(normalised(await stored())).toBe(normalised(inThread));
  });

  it('ends its threads on close, and a new pool starts fresh ones', async () => {
    const pool = metricsPool(2);
    await closeMetricsPool();
    expect(metricsPool(2)).not.toBe(pool);
    expect(metricsPool(2).started).toBe(0);
  });
});
