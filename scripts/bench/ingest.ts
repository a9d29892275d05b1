// Ingest benchmark (a script, never a timed test):
//   npx tsx scripts/bench/ingest.ts [--stems 1000000] [--big] [--gzip]
// For a generated batch of about --stems stems (and 4,000,000 more with --big): wall time of validate +
// load on PostgreSQL in a fresh database, measured in a child process (compiled, as the services run
// after `npm run build`) that also reports its peak memory (maxRSS); then `psql \copy` of the same trees
// file into a plain table on the same server, and of the loaded stems into a table with only the
// (visit, tree) primary key and into the real stems table. Prints the ratios. Needs PostgreSQL
// (DATABASE_URL, else postgres://postgres@127.0.0.1:5432/postgres as the admin database) and psql.

import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { parseArgs } from 'node:util';
import { createLogger, InProcessQueue, loadConfig } from '@stemwise/platform';
import { getBatch, migrateDatabase, openDatabase, syncForestTypes } from '@stemwise/db';
import { generateInventory } from '@stemwise/demo-inventory';
import { submitBatch } from '@stemwise/core';
import { bundle, ROOT } from '../build';
import type { IngestRun } from './support/ingest-child';
import { psql, STEMS_PER_DEMO_PLOT, withScratch } from './support/scratch';

const HERE = path.dirname(fileURLToPath(import.meta.url));

async function benchOne(adminUrl: string, stems: number, gzip: boolean): Promise<void> {
  await withScratch(adminUrl, 'ingest', async ({ work, dbUrl }) => {
    const plots = Math.max(1, Math.round(stems / STEMS_PER_DEMO_PLOT));
    let t0 = performance.now();
    const { truth } = await generateInventory({ outDir: path.join(work, 'batch'), plots, seed: 1, gzip });
    fs.rmSync(path.join(work, 'batch', 'truth.json'));
    const treesFile = path.join(work, 'batch', gzip ? 'trees.csv.gz' : 'trees.csv');
    const mb = fs.statSync(treesFile).size / 1e6;
    console.log(`\n== ${truth.counts.stems.rows.toLocaleString('en-US')} stems in ${plots.toLocaleString('en-US')} plots (${path.basename(treesFile)} ${mb.toFixed(1)} MB), generated in ${((performance.now() - t0) / 1000).toFixed(1)} s`);

    const env = { ...process.env, DATABASE_URL: dbUrl, STEMWISE_STORAGE_DIR: path.join(work, 'storage'), STEMWISE_LOG_LEVEL: 'warn' };
    const config = loadConfig(env);
    const log = createLogger('warn');
    const db = await openDatabase(config, { poolSize: 2 });
    await migrateDatabase(db);
    await syncForestTypes(db, config.forestTypes);
    t0 = performance.now();
    const files = fs.readdirSync(path.join(work, 'batch'), { withFileTypes: true }).filter((e) => e.isFile()).map((e) => e.name).map((name) => ({ kind: name.split('.')[0] as 'plots', name, source: path.join(work, 'batch', name) }));
    const { batchId } = await submitBatch({ config, db, log, queue: new InProcessQueue(log) }, files, {}, 'bench');
    const submitSeconds = (performance.now() - t0) / 1000;
    await db.close();

    // The child runs compiled JavaScript, as the services do after `npm run build` (see scripts/build.ts).
    const childBundle = path.join(ROOT, 'dist', 'bench-ingest-child.mjs');
    await bundle(path.join(HERE, 'support', 'ingest-child.ts'), childBundle);
    const r = spawnSync(process.execPath, [childBundle, batchId], { env, encoding: 'utf8', maxBuffer: 1 << 20 });
    if (r.status !== 0) throw new Error(`ingest child failed: ${r.stderr}`);
    const run = JSON.parse(r.stdout.trim().split('\n').pop()!) as IngestRun;

    psql(dbUrl, `create table bench_plain (plot_id text, tree_id text, species text, dbh_cm float8, height_m float8, status text, stump_cause text, fire_damage smallint, in_subplot smallint)`);
    const plainSeconds = psql(dbUrl, gzip ? `\\copy bench_plain from program 'gzip -dc ${treesFile}' csv header` : `\\copy bench_plain from '${treesFile}' csv header`);
    const stemsFile = path.join(work, 'stems.tsv');
    const cols = 'visit_id, tree_id, species, dbh_cm, height_m, status, stump_cause, fire_damage, in_subplot';
    psql(dbUrl, `\\copy (select ${cols} from stems) to '${stemsFile}'`, 'truncate stems');
    const constrainedSeconds = psql(dbUrl, `\\copy stems (${cols}) from '${stemsFile}'`);
    // The floor any keyed load meets: the same rows into a table with nothing but the (visit, tree) key.
    psql(dbUrl, `create table bench_keyed (like stems including defaults, primary key (visit_id, tree_id))`);
    const keyedSeconds = psql(dbUrl, `\\copy bench_keyed (${cols}) from '${stemsFile}'`);

    const n = truth.counts.stems.rows;
    console.log(`submit (durable copy + content hash): ${submitSeconds.toFixed(2)} s`);
    console.log(`ingest validate + load:               ${run.seconds.toFixed(2)} s  (${Math.round(n / run.seconds).toLocaleString('en-US')} stems/s; state ${run.state}, ${run.stemsLoaded.toLocaleString('en-US')} stems loaded${run.stemsLoaded === n ? '' : ` — EXPECTED ${n}`})`);
    console.log(`psql \\copy trees.csv -> plain table:  ${plainSeconds.toFixed(2)} s${gzip ? '  (from gzip -dc)' : ''}`);
    console.log(`psql \\copy stems -> key-only table:   ${keyedSeconds.toFixed(2)} s  (primary key (visit, tree) and nothing else)`);
    console.log(`psql \\copy stems -> stems table:      ${constrainedSeconds.toFixed(2)} s  (primary key (visit, tree), visit check, value checks)`);
    console.log(`ratio ingest / plain \\copy:           ${(run.seconds / plainSeconds).toFixed(2)}  (target <= 1.5)`);
    console.log(`ratio key-only \\copy / plain \\copy:   ${(keyedSeconds / plainSeconds).toFixed(2)}  (what the unique key alone costs)`);
    console.log(`ratio ingest / \\copy into stems:      ${(run.seconds / constrainedSeconds).toFixed(2)}`);
    console.log(`peak memory of the ingest process:    ${run.maxRssMb.toFixed(0)} MB (maxRSS; target < 300 MB); of it ${run.baselineRssMb.toFixed(0)} MB before the batch (modules, pool); peak V8 heap ${run.peakHeapMb.toFixed(0)} MB, buffers ${run.peakExternalMb.toFixed(0)} MB`);
    console.log(`load average now: ${os.loadavg().map((x) => x.toFixed(1)).join(' ')} on ${os.cpus().length} cores`);
  });
}

/** The ingest section of `npm run bench`. */
export async function runIngestBench(args: string[] = []): Promise<void> {
  const { values } = parseArgs({ args, options: { stems: { type: 'string', default: '1000000' }, big: { type: 'boolean', default: false }, gzip: { type: 'boolean', default: false } } });
  const adminUrl = loadConfig().databaseUrl ?? 'postgres://postgres@127.0.0.1:5432/postgres';
  console.log('ingest benchmark (wall times on this machine; other work running at the same time shows in them)');
  await benchOne(adminUrl, Number(values.stems), values.gzip!);
  if (values.big) await benchOne(adminUrl, 4_000_000, values.gzip!);
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  await runIngestBench(process.argv.slice(2));
}
