// Benchmark of the metrics stage on PostgreSQL: generates and loads (straight into the tables with
// COPY, not through ingest) about 250k, 1M and, with --big, 4M stems in plots of ~125 stems, then
// plans a recompute and runs every plot-chunk job (the processor's own function, as many at once as
// STEMWISE_COMPUTE_CONCURRENCY) and prints the wall time and µs per stem of each size, then the fits
// stage and the region summaries stage (twice: after the fits, and again with every region marked
// stale but no fit changed, which draws no chart anew). With --in-process the run goes through the
// in-process queue with the services' own processors instead (as `stemwise recompute` without
// REDIS_URL runs it: metrics, fits, summaries) and its stage times are printed.
//
//   DATABASE_URL=postgres://postgres@127.0.0.1:5432/postgres npx tsx scripts/bench/compute.ts [--big] [--sizes 250000,1000000] [--in-process]
//
// DATABASE_URL (default: the local server) names a database used only to create and drop a scratch database per size.
import { parseArgs } from 'node:util';
import { createLogger, InProcessQueue, loadConfig, type JobQueue } from '@stemwise/platform';
import { getRecomputeRun, markStale, migrateDatabase, openDatabase, syncForestTypes, type Db } from '@stemwise/db';
import { computePlotChunk, refreshStaleFits, service as computeService } from '@stemwise/compute';
import { refreshStaleSummaries, service as reportService } from '@stemwise/report';
import { finishPlotsStage, planRecompute, stageTimeLines, type StageTime } from '@stemwise/core';
import { load, REGIONS } from './support/inventory';

const { values } = parseArgs({
  options: { big: { type: 'boolean', default: false }, sizes: { type: 'string' }, keep: { type: 'boolean', default: false }, 'in-process': { type: 'boolean', default: false } },
});
const sizes = values.sizes ? values.sizes.split(',').map(Number) : [250_000, 1_000_000, ...(values.big ? [4_000_000] : [])];
// The local server when DATABASE_URL is unset, as the other benchmarks do.
const config = { ...loadConfig(), databaseUrl: loadConfig().databaseUrl ?? 'postgres://postgres@127.0.0.1:5432/postgres' };
const log = createLogger('warn');

function withDatabase(url: string, name: string): string {
  const u = new URL(url);
  u.pathname = `/${name}`;
  return u.toString();
}

async function pool<T>(items: readonly T[], concurrency: number, fn: (item: T) => Promise<void>): Promise<void> {
  let next = 0;
  await Promise.all(Array.from({ length: Math.min(concurrency, items.length) }, async () => {
    while (next < items.length) await fn(items[next++]);
  }));
}

async function benchOne(nStems: number): Promise<void> {
  const name = `stemwise_bench_${process.pid}_${nStems}`;
  const admin = await openDatabase(config, { poolSize: 1 });
  await admin.query(`drop database if exists "${name}"`);
  await admin.query(`create database "${name}"`);
  const benchConfig = { ...config, databaseUrl: withDatabase(config.databaseUrl!, name) };
  const db = await openDatabase(benchConfig, { poolSize: 4 });
  try {
    await migrateDatabase(db);
    await syncForestTypes(db, benchConfig.forestTypes);
    let t = performance.now();
    const stems = await load(db, nStems);
    const loadMs = performance.now() - t;

    if (values['in-process']) {
      await inProcessRun(benchConfig, db, stems);
      return;
    }
    // A queue that only collects the flow: the chunks are then run here, as the workers would.
    let flow: { children?: unknown[] } | null = null;
    const collect = { kind: 'in-process', add: async (spec: never) => void (flow = spec) } as unknown as JobQueue;
    const deps = { config: benchConfig, db, log, queue: collect };
    t = performance.now();
    const plan = await planRecompute(deps, 'manual');
    const planMs = performance.now() - t;
    type Chunk = { jobId: string; data: { runId: string; visitIds: number[] } };
    const chunks = ((flow as unknown as { children: [{ children: [{ children: Chunk[] }] }] }).children[0].children[0].children ?? []) as Chunk[];
    t = performance.now();
    await pool(chunks, benchConfig.computeConcurrency, async (c) => void (await computePlotChunk(deps, c.data.runId, c.data.visitIds, c.jobId)));
    await finishPlotsStage(deps, plan!.runId);
    const chunkMs = performance.now() - t;
    t = performance.now();
    await refreshStaleFits(deps);
    const fitsMs = performance.now() - t;
    t = performance.now();
    let cpu = process.cpuUsage();
    await refreshStaleSummaries(deps);
    const summariesMs = performance.now() - t;
    const summariesCpuMs = process.cpuUsage(cpu).user / 1000;
    await markStale(db, 'summary', REGIONS);
    t = performance.now();
    cpu = process.cpuUsage();
    await refreshStaleSummaries(deps);
    const summariesAgainMs = performance.now() - t;
    const summariesAgainCpuMs = process.cpuUsage(cpu).user / 1000;
    const metricsMs = planMs + chunkMs;
    const [{ n }] = await db.query<{ n: number }>(`select count(*)::int n from plot_metrics`);
    process.stdout.write(
      `${String(stems).padStart(9)} stems ${String(n).padStart(6)} plots | load ${(loadMs / 1000).toFixed(1)} s | ` +
        `metrics ${(metricsMs / 1000).toFixed(2)} s (plan + height models ${(planMs / 1000).toFixed(2)} s, ${chunks.length} chunks ${(chunkMs / 1000).toFixed(2)} s) ` +
        `= ${((metricsMs * 1000) / stems).toFixed(2)} µs/stem | fits ${(fitsMs / 1000).toFixed(2)} s | ` +
        `summaries ${(summariesMs / 1000).toFixed(2)} s (${(summariesCpuMs / 1000).toFixed(2)} s CPU here), ` +
        `again with no fit changed ${(summariesAgainMs / 1000).toFixed(2)} s (${(summariesAgainCpuMs / 1000).toFixed(2)} s CPU here)\n`,
    );
  } finally {
    await db.close();
    if (values.keep) process.stdout.write(`kept database ${name}\n`);
    else await admin.query(`drop database if exists "${name}" with (force)`);
    await admin.close();
  }
}

/** The whole run through the in-process queue and the services' processors; prints the stage times the run recorded. */
async function inProcessRun(benchConfig: typeof config, db: Db, stems: number): Promise<void> {
  const queue = new InProcessQueue(log);
  const deps = { config: benchConfig, db, log, queue };
  await queue.work(
    { ...computeService.createProcessors(deps), ...reportService.createProcessors(deps) },
    { queues: ['compute', 'report', 'maintenance'], concurrency: { compute: benchConfig.computeConcurrency } },
  );
  try {
    const t = performance.now();
    const plan = await planRecompute(deps, 'manual');
    const failures = await queue.drain();
    if (failures.length) throw new Error(`a job failed: ${failures[0].jobId}: ${failures[0].error}`);
    const ms = performance.now() - t;
    const run = await getRecomputeRun(db, plan!.runId);
    const stages = run!.details.stages as Record<string, StageTime>;
    process.stdout.write(`${String(stems).padStart(9)} stems | in-process run ${(ms / 1000).toFixed(2)} s, metrics stage ${(stages.metrics.ms / 1000).toFixed(2)} s\n${stageTimeLines(stages).join('\n')}\n`);
  } finally {
    await queue.close();
  }
}

process.stdout.write(`bench-compute: PostgreSQL, chunks of ${config.chunkPlots} plots, ${config.computeConcurrency} at once\n`);
// A first small run warms the JIT up (a long-lived worker is warm); its line is marked as such.
process.stdout.write('warm-up: ');
await benchOne(25_000);
for (const n of sizes) await benchOne(n);
