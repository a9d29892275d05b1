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
import crypto from 'node:crypto';
import { parseArgs } from 'node:util';
import { createLogger, InProcessQueue, loadConfig, type JobQueue } from '@stemwise/platform';
import { getRecomputeRun, markStale, migrateDatabase, openDatabase, syncForestTypes, type Db } from '@stemwise/db';
import { computePlotChunk, refreshStaleFits, service as computeService } from '@stemwise/compute';
import { refreshStaleSummaries, service as reportService } from '@stemwise/report';
import { finishPlotsStage, planRecompute, stageTimeLines, type StageTime } from '@stemwise/core';
import { fixtureSpecies, loadSpecies, rng } from '../../test/compute/fixtures';

const { values } = parseArgs({
  options: { big: { type: 'boolean', default: false }, sizes: { type: 'string' }, keep: { type: 'boolean', default: false }, 'in-process': { type: 'boolean', default: false } },
});
const sizes = values.sizes ? values.sizes.split(',').map(Number) : [250_000, 1_000_000, ...(values.big ? [4_000_000] : [])];
// The local server when DATABASE_URL is unset, as the other benchmarks do.
const config = { ...loadConfig(), databaseUrl: loadConfig().databaseUrl ?? 'postgres://postgres@127.0.0.1:5432/postgres' };
const log = createLogger('warn');
const STEMS_PER_PLOT = 125;
const FOREST_TYPES = ['wet', 'moist', 'dry'];
const REGIONS = ['Harrowmere', 'Kestrel Downs', 'Sallowfen', 'Brackenholt'];

function withDatabase(url: string, name: string): string {
  const u = new URL(url);
  u.pathname = `/${name}`;
  return u.toString();
}

/** Plots and visits by unnest, stems by COPY; returns the number of stems loaded. */
async function load(db: Db, nStems: number): Promise<number> {
  const species = fixtureSpecies();
  await loadSpecies(db, species);
  const r = rng(nStems);
  const nPlots = Math.round(nStems / STEMS_PER_PLOT);
  const batchId = crypto.randomUUID();
  await db.query(`insert into batches (id, state, content_hash, files) values ($1, 'loaded', $2, '{}'::jsonb)`, [batchId, batchId]);
  await db.query(`insert into regions (name) select unnest($1::text[]) on conflict do nothing`, [REGIONS]);
  const regionIds = await db.query<{ id: number }>(`select id from regions order by id`);
  const keys = Array.from({ length: nPlots }, (_, i) => `B${String(i).padStart(6, '0')}`);
  await db.query(
    `insert into plots (plot_key, region_id, forest_type, latitude, longitude)
     select k, ($2::int[])[1 + (i % 4)], ($3::text[])[1 + (i % 3)], -2 - (i % 100) * 0.01, 20 + (i % 97) * 0.01
       from unnest($1::text[]) with ordinality t(k, i)`,
    [keys, regionIds.map((x) => x.id), FOREST_TYPES],
  );
  const visits = await db.query<{ id: string }>(
    `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, logging_class, fire_class)
     select id, date '2024-03-01', $1, 0.25, id % 4, (id / 4) % 4 from plots order by id returning id`,
    [batchId],
  );
  let stems = 0;
  await db.transaction(async (tx) => {
    async function* rows(): AsyncGenerator<string> {
      let buf = '';
      for (const v of visits) {
        const n = 100 + Math.floor(r() * 51);
        const heights = r() < 0.2;
        const disturbance = r();
        for (let t = 0; t < n; t++) {
          const sp = species[Math.floor(species.length * r() * r())];
          const u = r();
          const status = u < 0.04 ? 'dead' : u < 0.04 + 0.2 * disturbance ? 'stump' : 'live';
          const d = Math.min(250, 10 + -Math.log(1 - r()) * 14);
          const lnD = Math.log(d);
          const h = heights && status === 'live' ? Math.min(60, Math.max(1.5, Math.exp(0.893 + 0.76 * lnD - 0.034 * lnD * lnD + (r() - 0.5) * 0.5))).toFixed(1) : '';
          const style = r();
          const name = style < 0.03 ? '' : style < 0.05 ? 'indet' : style < 0.07 ? sp.name.toUpperCase() : sp.name;
          buf += `${v.id},T${t},${name},${d.toFixed(1)},${h},${status},${status === 'stump' ? 'logged' : ''},${status === 'stump' ? 0 : Math.floor(r() * 2)},f\n`;
          stems++;
        }
        if (buf.length > 1 << 20) {
          yield buf;
          buf = '';
        }
      }
      if (buf) yield buf;
    }
    await tx.copyFrom(`copy stems (visit_id, tree_id, species, dbh_cm, height_m, status, stump_cause, fire_damage, in_subplot) from stdin (format csv)`, rows());
  });
  await db.query(`analyze`);
  return stems;
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
