import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BullQueue } from '@stemwise/platform/bullmq';
import { InProcessQueue, type JobQueue, type ProcessorMap } from '@stemwise/platform';
import { testLogger, useServices, type TestServices } from '../support/services';

// The same processors behind both backends: a flow's children run before their parent, a duplicate
// job id is added once, and a payload is parsed by its processor.
function recorder() {
  const ran: string[] = [];
  const processors: ProcessorMap = {
    'compute.plot-chunk': async (data) => void ran.push(`chunk:${(data as { visitIds: number[] }).visitIds.join('+')}`),
    'compute.plots': async (data) => void ran.push(`plots:${(data as { runId: string }).runId}`),
    'compute.fits': async () => void ran.push('fits'),
  };
  return { ran, processors };
}

async function exercise(queue: JobQueue) {
  const { ran, processors } = recorder();
  await queue.work(processors, { queues: ['compute'] });
  const flow = {
    name: 'compute.plots' as const,
    data: { runId: 'r1' },
    jobId: 'plots.r1',
    children: [
      { name: 'compute.plot-chunk' as const, data: { runId: 'r1', visitIds: [1, 2] }, jobId: 'chunk.r1.0' },
      { name: 'compute.plot-chunk' as const, data: { runId: 'r1', visitIds: [3] }, jobId: 'chunk.r1.1' },
    ],
  };
  await queue.add(flow);
  await queue.add(flow); // same ids: nothing more
  const failures = await queue.drain(30_000);
  expect(failures).toEqual([]);
  expect(ran.filter((r) => r.startsWith('chunk')).sort()).toEqual(['chunk:1+2', 'chunk:3']);
  expect(ran.at(-1)).toBe('plots:r1');
  expect(ran).toHaveLength(3);
  expect(await queue.state('plots.r1', 'compute.plots')).toBe('completed');
}

describe('job queue', () => {
  let s: TestServices;
  beforeAll(async () => void (s = await useServices()));
  afterAll(async () => s?.cleanup());

  it('runs a flow in order under the in-process backend', async () => {
    await exercise(new InProcessQueue(testLogger()));
  });

  it('runs a flow in order under BullMQ on real Redis', async () => {
    const queue = await BullQueue.open({ url: s.redisUrl, prefix: s.prefix, attempts: 2, log: testLogger() });
    try {
      await exercise(queue);
    } finally {
      await queue.close();
    }
  });

  it('refuses to start a worker whose queue has a job without a processor', async () => {
    const queue = new InProcessQueue(testLogger());
    await expect(queue.work({ 'compute.fits': async () => {} }, { queues: ['compute'] })).rejects.toThrow(/compute.plots.*no processor|has no processor/);
  });

  it('reports a failing child and skips its parent in-process', async () => {
    const queue = new InProcessQueue(testLogger());
    const { ran, processors } = recorder();
    processors['compute.plot-chunk'] = async () => {
      throw new Error('disk on fire');
    };
    await queue.work(processors, { queues: ['compute'] });
    await queue.add({ name: 'compute.plots', data: { runId: 'r2' }, jobId: 'p2', children: [{ name: 'compute.plot-chunk', data: { runId: 'r2', visitIds: [1] }, jobId: 'c2' }] });
    const failures = await queue.drain();
    expect(failures.map((f) => f.jobId)).toEqual(['c2', 'p2']);
    expect(failures[0].error).toContain('disk on fire');
    expect(ran).toEqual([]);
  });

  it('in-process, runs up to a queue\'s concurrency of its jobs at once; a parent and other queues wait for them', async () => {
    const queue = new InProcessQueue(testLogger());
    const events: string[] = [];
    let running = 0;
    let most = 0;
    const slow = (label: string) => async () => {
      events.push(`start ${label}`);
      most = Math.max(most, ++running);
      await new Promise((r) => setTimeout(r, 30));
      running--;
      events.push(`end ${label}`);
    };
    await queue.work(
      {
        'compute.plot-chunk': async (data) => slow(`chunk ${(data as { visitIds: number[] }).visitIds[0]}`)(),
        'compute.plots': slow('plots'),
        'compute.fits': slow('fits'),
        'report.summaries': slow('summaries'),
      },
      { queues: ['compute', 'report'], concurrency: { compute: 2 } },
    );
    const chunks = [1, 2, 3].map((v) => ({ name: 'compute.plot-chunk' as const, data: { runId: 'r3', visitIds: [v] }, jobId: `chunk.r3.${v}` }));
    await queue.add({ name: 'compute.plots', data: { runId: 'r3' }, jobId: 'plots.r3', children: chunks });
    await queue.add({ name: 'report.summaries', data: { runId: 'r3' }, jobId: 'summaries.r3' });
    expect(await queue.drain()).toEqual([]);
    expect(most).toBe(2); // two chunks at once, never more
    expect(events.slice(0, 2)).toEqual(['start chunk 1', 'start chunk 2']);
    // The parent starts after its last child ended; the job of another queue after the parent.
    expect(events.indexOf('start plots')).toBeGreaterThan(events.indexOf('end chunk 3'));
    expect(events.indexOf('start summaries')).toBeGreaterThan(events.indexOf('end plots'));
    // Without a concurrency, one at a time as before.
    const sequential = new InProcessQueue(testLogger());
    most = 0;
    await sequential.work({ 'compute.plot-chunk': async () => slow('chunk')(), 'compute.plots': slow('plots'), 'compute.fits': slow('fits') }, { queues: ['compute'] });
    await sequential.add({ name: 'compute.plots', data: { runId: 'r4' }, jobId: 'plots.r4', children: chunks.map((c) => ({ ...c, jobId: c.jobId.replace('r3', 'r4') })) });
    expect(await sequential.drain()).toEqual([]);
    expect(most).toBe(1);
  });
});
