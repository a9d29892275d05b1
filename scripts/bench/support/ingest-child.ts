// The measured side of the ingest benchmark (see ../ingest.ts): validates and loads one stored
// batch, then prints wall time and peak memory as JSON on stdout. Run compiled, as a service runs.

import { createLogger, InProcessQueue, loadConfig } from '@stemwise/platform';
import { getBatch, openDatabase } from '@stemwise/db';
import { processBatch } from '@stemwise/ingest';

export interface IngestRun {
  seconds: number;
  maxRssMb: number;
  /** Peaks sampled every 100 ms: the V8 heap in use, and memory outside it (buffers). */
  peakHeapMb: number;
  peakExternalMb: number;
  /** maxRSS before the batch was touched (modules loaded, pool open). */
  baselineRssMb: number;
  state: string;
  stemsLoaded: number;
}

/** Child: validate and load one stored batch, then report wall time and peak memory as JSON on stdout. */
export async function child(batchId: string): Promise<void> {
  const config = loadConfig();
  const log = createLogger('warn');
  const db = await openDatabase(config, { poolSize: 3 });
  await db.query('select 1');
  const baselineRssMb = process.resourceUsage().maxRSS / 1024;
  let peakHeap = 0;
  let peakExternal = 0;
  const sampler = setInterval(() => {
    const m = process.memoryUsage();
    peakHeap = Math.max(peakHeap, m.heapUsed);
    peakExternal = Math.max(peakExternal, m.external + m.arrayBuffers);
  }, 100);
  const t0 = performance.now();
  await processBatch({ config, db, log, queue: new InProcessQueue(log) }, batchId);
  const seconds = (performance.now() - t0) / 1000;
  clearInterval(sampler);
  const b = await getBatch(db, batchId);
  await db.close();
  const out: IngestRun = {
    seconds,
    maxRssMb: process.resourceUsage().maxRSS / 1024,
    peakHeapMb: peakHeap / 1e6,
    peakExternalMb: peakExternal / 1e6,
    baselineRssMb,
    state: b!.state,
    stemsLoaded: b!.stemsLoaded,
  };
  process.stdout.write(`${JSON.stringify(out)}\n`);
}


if (process.argv[2]) await child(process.argv[2]);
