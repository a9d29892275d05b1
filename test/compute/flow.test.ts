import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ServiceDeps } from '@stemwise/core';
import { BullQueue } from '@stemwise/platform/bullmq';
import type { ProcessorMap } from '@stemwise/platform';
import { createProcessors } from '@stemwise/compute';
import { expectedUnresolved, fixtureSpecies, generateInventory, loadInventory, loadSpecies } from './fixtures';
import { standInSummaries } from './support';
import { testLogger, useServices, type TestServices } from '../support/services';

// The recompute flow under BullMQ on a real Redis: the planner job queues the flow, the chunks run
// (two at a time) before the plots parent, then the fits, then the summaries root.
describe('recompute flow under BullMQ', () => {
  let s: TestServices;
  let queue: BullQueue;
  const inventory = generateInventory({ seed: 9, plotsPerCell: 3, stemsPerPlot: 30 });
  const nVisits = inventory.reduce((a, p) => a + p.visits.length, 0);

  beforeAll(async () => {
    s = await useServices({ STEMWISE_CHUNK_PLOTS: '6', STEMWISE_BOOTSTRAP: '50' });
    await loadSpecies(s.db, fixtureSpecies());
    await loadInventory(s.db, inventory);
    queue = await BullQueue.open({ url: s.redisUrl, prefix: s.prefix, attempts: 2, log: testLogger() });
  });
  afterAll(async () => {
    await queue?.close();
    await s?.cleanup();
  });

  it('runs chunks, then plots, then fits, then summaries, with deterministic job ids', async () => {
    const deps: ServiceDeps = { config: s.config, db: s.db, log: testLogger(), queue };
    const ran: string[] = [];
    const recorded = (map: ProcessorMap): ProcessorMap =>
      Object.fromEntries(
        Object.entries(map).map(([name, p]) => [
          name,
          async (data: unknown, ctx: Parameters<NonNullable<ProcessorMap['compute.fits']>>[1]) => {
            const out = await p!(data, ctx);
            ran.push(`${name}:${ctx.jobId}`);
            return out;
          },
        ]),
      );
    const processors = { ...recorded(createProcessors(deps)), ...standInSummaries(s.db, ran), 'maintenance.reconcile': async () => null };
    await queue.work(processors, { queues: ['compute', 'report', 'maintenance'], concurrency: { compute: 2 } });
    await queue.add({ name: 'maintenance.recompute', data: { trigger: 'batch', all: false }, jobId: 'recompute.batch.test' });
    await queue.drain(60_000);

    const [run] = await s.db.query<{ id: string; state: string; trigger: string }>(`select id, state, trigger from recompute_runs`);
    expect(run).toMatchObject({ state: 'done', trigger: 'batch' });
    const chunks = Math.ceil(nVisits / 6);
    const names = ran.map((r) => r.split(':')[0]);
    expect(names[0]).toBe('maintenance.recompute');
    expect(names.filter((n) => n === 'compute.plot-chunk')).toHaveLength(chunks);
    const lastChunk = names.lastIndexOf('compute.plot-chunk');
    expect(names.slice(lastChunk + 1)).toEqual(['compute.plots', 'compute.fits', 'report.summaries']);
    expect(ran).toContain(`compute.plots:plots.${run.id}`);
    expect(ran).toContain(`compute.fits:fits.${run.id}`);
    expect(ran).toContain(`compute.plot-chunk:chunk.${run.id}.${chunks - 1}`);
    expect(await queue.state(`summaries.${run.id}`, 'report.summaries')).toBe('completed');
    const [{ stale }] = await s.db.query<{ stale: number }>(`select count(*)::int stale from plot_visits where stale`);
    expect(stale).toBe(0);
    // chunks ran two at a time: the per-batch counts still add up
    const rows = await s.db.query<{ name: string; stems: number }>(`select name, stems from batch_unresolved_names`);
    expect(Object.fromEntries(rows.map((r) => [r.name, r.stems]))).toEqual(expectedUnresolved(inventory));

    // Only fits due (no stale visit): a run whose plots stage has no chunk still goes through.
    await s.db.query(`insert into stale_work (kind, key) values ('fits', 'wet')`);
    ran.length = 0;
    await queue.add({ name: 'maintenance.recompute', data: { trigger: 'manual', all: false }, jobId: 'recompute.manual.test' });
    await queue.drain(60_000);
    expect(ran.map((r) => r.split(':')[0])).toEqual(['maintenance.recompute', 'compute.plots', 'compute.fits', 'report.summaries']);
    expect(await s.db.query(`select kind, key from stale_work`)).toEqual([]);
  });
});
