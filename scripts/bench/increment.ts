// Benchmark of a small batch into a large inventory: an 8,000-plot inventory (about 1 million stems,
// loaded straight into the tables and computed once with `stemwise recompute --now --all`), then a batch
// of 50 new plots of one region uploaded with `stemwise upload DIR --wait` (ingest, metrics, fits,
// summaries; timed end to end, the process start included), then `stemwise recompute --now` as the
// nightly run after it. Prints each command's wall time, the stage times of its run, and what it
// recomputed: plot visits, height models replaced, forest types fitted, regions and national summaries
// given a new version. The commands run compiled (dist/stemwise.mjs, built first), jobs in-process,
// against a scratch database of the PostgreSQL of DATABASE_URL (or the local server). Last, the page of
// the region served in this process (the report draws a page's charts when first served, then keeps
// them): once for another region (the process's first page), then twice for the batch's region, cold
// and kept.
//
//   npm run bench -- --only increment [--plots 8000] [--batch 50] [--region Sallowfen]
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { createLogger, InProcessQueue, loadConfig, type Config } from '@stemwise/platform';
import { buildServer } from '@stemwise/report';
import { createToken } from '../../test/report/tokens';
import { getRecomputeRun, migrateDatabase, openDatabase, syncForestTypes, type Db } from '@stemwise/db';
import { stageTimeLines, type StageTime } from '@stemwise/core';
import { bundle, BUNDLE, ROOT } from '../build';
import { load, REGIONS, STEMS_PER_PLOT, writeBatch } from './support/inventory';
import { withScratch } from './support/scratch';

const { values } = parseArgs({ options: { plots: { type: 'string', default: '8000' }, batch: { type: 'string', default: '50' }, region: { type: 'string', default: REGIONS[2] } } });
const adminUrl = process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:5432/postgres';
const BIN = path.join(ROOT, 'bin', 'stemwise.mjs');

function stemwise(args: string[], env: Record<string, string>): { s: number; stdout: string } {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, [BIN, ...args], { env: { ...process.env, ...env, REDIS_URL: '' }, encoding: 'utf8', maxBuffer: 1 << 24 });
  const s = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`stemwise ${args.join(' ')} failed (${r.status}): ${r.stderr}`);
  return { s, stdout: r.stdout };
}

/** Every stored summary version (regions and national), to tell which ones a command added. */
async function versions(db: Db): Promise<Map<string, number>> {
  const rows = await db.query<{ k: string; v: number }>(
    `select r.name k, max(s.version)::int v from region_summaries s join regions r on r.id = s.region_id group by r.name
     union all select 'national', max(version)::int from national_summaries`,
  );
  return new Map(rows.map((r) => [r.k, r.v ?? 0]));
}

/** What the runs started since `since` recomputed, with their stage times. */
async function report(db: Db, label: string, s: number, since: Date, before: Map<string, number>): Promise<void> {
  const runs = await db.query<{ id: string }>(`select id from recompute_runs where started_at >= $1 order by started_at`, [since]);
  const after = await versions(db);
  const summaries = [...after].filter(([k, v]) => v !== (before.get(k) ?? 0)).map(([k]) => k);
  const lines = [`${label}: ${s.toFixed(2)} s end to end`];
  for (const { id } of runs) {
    const run = await getRecomputeRun(db, id);
    const d = run!.details as {
      plan?: { visits: number; heightModels: Array<{ forestType: string; outcome: string; visitsMarked: number }> };
      fits?: Array<{ forestType: string }>;
      stages?: Record<string, StageTime>;
    };
    const replaced = (d.plan?.heightModels ?? []).filter((h) => h.outcome !== 'unchanged' && h.outcome !== 'kept');
    lines.push(
      `  run ${id} (${run!.trigger}): ${d.plan?.visits ?? 0} plot visits computed; height models replaced: ${replaced.map((h) => `${h.forestType} (${h.visitsMarked} visits due)`).join(', ') || 'none'}; ` +
        `forest types fitted: ${(d.fits ?? []).map((f) => f.forestType).join(', ') || 'none'}`,
    );
    lines.push(...stageTimeLines(d.stages).map((l) => `  ${l}`));
  }
  if (!runs.length) lines.push('  no run (nothing stale)');
  lines.push(`  new summary versions: ${summaries.join(', ') || 'none'}`);
  process.stdout.write(lines.join('\n') + '\n');
}

/** Serves region pages in this process (inject, no socket) and prints each one's time. */
async function pageServe(config: Config, db: Db, region: string, other: string): Promise<void> {
  const log = createLogger('warn');
  const app = await buildServer({ config, db, log, queue: new InProcessQueue(log) }, { summaryCheckMs: 0 });
  try {
    const headers = { authorization: `Bearer ${(await createToken(db, 'admin', [], 'bench')).token}` };
    const serve = async (r: string, what: string) => {
      const t0 = performance.now();
      const res = await app.inject({ url: `/regions/${encodeURIComponent(r)}`, headers });
      const ms = performance.now() - t0;
      if (res.statusCode !== 200) throw new Error(`GET /regions/${r}: ${res.statusCode}`);
      process.stdout.write(`  ${what.padEnd(46)} ${ms.toFixed(0).padStart(5)} ms  ${(res.body.length / 1024).toFixed(0)} kB\n`);
    };
    process.stdout.write(`region page served (charts drawn on first serve, then kept):\n`);
    await serve(other, `${other}, the process's first page`);
    await serve(region, `${region}, its charts not drawn yet`);
    await serve(region, `${region} again, its charts kept`);
  } finally {
    await app.close();
  }
}

await withScratch(adminUrl, 'increment', async ({ work, dbUrl }) => {
  await bundle(path.join(ROOT, 'cli', 'src', 'main.ts'), BUNDLE, { split: true });
  const config = { ...loadConfig(), databaseUrl: dbUrl };
  const db = await openDatabase(config, { poolSize: 2 });
  try {
    await migrateDatabase(db);
    await syncForestTypes(db, config.forestTypes);
    let t0 = performance.now();
    const stems = await load(db, Number(values.plots) * STEMS_PER_PLOT);
    process.stdout.write(`loaded ${values.plots} plots, ${stems.toLocaleString('en')} stems in ${((performance.now() - t0) / 1000).toFixed(1)} s (straight into the tables)\n`);
    const env = { DATABASE_URL: dbUrl, STEMWISE_DATA_DIR: path.join(work, 'data'), STEMWISE_LOG_LEVEL: 'warn' };
    const first = stemwise(['recompute', '--now', '--all'], env);
    process.stdout.write(`first full recompute: ${first.s.toFixed(2)} s\n`);

    const dir = path.join(work, 'batch');
    writeBatch(dir, Number(values.batch), values.region, 11);
    let before = await versions(db);
    let since = new Date();
    const upload = stemwise(['upload', dir, '--wait'], env);
    await report(db, `upload --wait of ${values.batch} new plots in ${values.region}`, upload.s, since, before);

    before = await versions(db);
    since = new Date();
    const nightly = stemwise(['recompute', '--now'], env);
    await report(db, `recompute --now after it (the nightly run's work)`, nightly.s, since, before);
    await pageServe(config, db, values.region, REGIONS.find((r) => r !== values.region)!);
  } finally {
    await db.close();
  }
});
