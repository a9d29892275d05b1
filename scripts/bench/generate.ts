// Benchmark of the generator (a script, not a test): wall and CPU time, stems per second and peak
// memory for a large run.
//   npm run bench -- --only generate [--plots 20000] [--gzip] [--out DIR]
// Without --out it writes to a temporary folder and removes it afterwards.

import { mkdtemp, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import { generateInventory } from '@stemwise/demo-inventory';

const { values } = parseArgs({
  options: {
    plots: { type: 'string', default: '20000' },
    seed: { type: 'string', default: '7' },
    gzip: { type: 'boolean', default: false },
    out: { type: 'string' },
  },
});

const outDir = values.out ?? (await mkdtemp(join(tmpdir(), 'demo-inventory-bench-')));
let peakRss = 0;
let peakHeap = 0;
const sampler = setInterval(() => {
  const m = process.memoryUsage();
  peakRss = Math.max(peakRss, m.rss);
  peakHeap = Math.max(peakHeap, m.heapUsed);
}, 100);
const cpu0 = process.cpuUsage();
const t0 = performance.now();
let lastTenth = -1;
try {
  const result = await generateInventory({
    outDir,
    plots: Number(values.plots),
    seed: Number(values.seed),
    gzip: values.gzip,
    onProgress: (p) => {
      const tenth = Math.floor((10 * p.plotsDone) / p.plotsTotal);
      if (tenth === lastTenth) return;
      lastTenth = tenth;
      const m = process.memoryUsage();
      console.log(`${tenth * 10}%  ${((performance.now() - t0) / 1000).toFixed(1)} s  heap ${(m.heapUsed / 1e6).toFixed(0)} MB  rss ${(m.rss / 1e6).toFixed(0)} MB`);
    },
  });
  const seconds = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  let bytes = 0;
  for (const f of Object.values(result.files)) bytes += (await stat(f)).size;
  const stems = result.truth.counts.stems.rows;
  console.log(JSON.stringify({
    plots: result.truth.counts.plots,
    stems,
    gzip: values.gzip,
    wall_s: Number(seconds.toFixed(1)),
    cpu_s: Number(((cpu.user + cpu.system) / 1e6).toFixed(1)),
    stems_per_s: Math.round(stems / seconds),
    output_mb: Number((bytes / 1e6).toFixed(1)),
    peak_rss_mb: Math.round(peakRss / 1e6),
    peak_heap_mb: Math.round(peakHeap / 1e6),
  }));
} finally {
  clearInterval(sampler);
  if (values.out === undefined) await rm(outDir, { recursive: true, force: true });
}
