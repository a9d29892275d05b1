// Benchmark of the whole pipeline as a user runs it, against the floor of any load: `psql \copy` of the
// same trees file into a plain table of text columns. Generates the demo inventory (--stems, about 1.36
// million by default, in plots of the generator's ~585 stems; or --plots), then in a scratch database of the PostgreSQL of DATABASE_URL (or
// the local server), with jobs in-process (no Redis), times:
//   \copy of trees.csv into a plain table · `stemwise upload DIR --wait` (ingest, metrics, fits,
//   summaries) · `stemwise recompute --now --all`, and the stage times that command prints;
// each with its ratio to the \copy. The commands run compiled (dist/stemwise.mjs, built first).
//
//   npm run bench -- --only pipeline [--stems 1360000 | --plots N] [--seed 7] [--inventory DIR]
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import pg from 'pg';
import { generateInventory } from '@stemwise/demo-inventory';
import { bundle, BUNDLE, ROOT } from '../build';
import { psql, STEMS_PER_DEMO_PLOT, withScratch } from './support/scratch';

const { values } = parseArgs({ options: { inventory: { type: 'string' }, stems: { type: 'string', default: '1360000' }, plots: { type: 'string' }, seed: { type: 'string', default: '7' } } });
const plots = values.plots ? Number(values.plots) : Math.max(1, Math.round(Number(values.stems) / STEMS_PER_DEMO_PLOT));
const adminUrl = process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:5432/postgres';
const BIN = path.join(ROOT, 'bin', 'stemwise.mjs');

const seconds = (t0: number) => (performance.now() - t0) / 1000;

// GNU time reports the peak resident set of the command (its worker threads included); without it, no peak.
const GNU_TIME = fs.existsSync('/usr/bin/time') ? '/usr/bin/time' : null;

/** Runs `stemwise …` compiled, with jobs in-process; returns its wall time, peak RSS (MB, where GNU time exists) and stdout. */
function stemwise(args: string[], env: Record<string, string>, work: string): { s: number; peakMb: number | null; stdout: string } {
  const rssFile = path.join(work, 'rss.txt');
  const [cmd, argv] = GNU_TIME ? [GNU_TIME, ['-f', '%M', '-o', rssFile, process.execPath, BIN, ...args]] : [process.execPath, [BIN, ...args]];
  const t0 = performance.now();
  const r = spawnSync(cmd, argv, { env: { ...process.env, ...env, REDIS_URL: '' }, encoding: 'utf8', maxBuffer: 1 << 24 });
  const s = seconds(t0);
  if (r.status !== 0) throw new Error(`stemwise ${args.join(' ')} failed (${r.status}): ${r.stderr}`);
  const kb = GNU_TIME && fs.existsSync(rssFile) ? Number(fs.readFileSync(rssFile, 'utf8').trim().split('\n').pop()) : NaN;
  return { s, peakMb: Number.isFinite(kb) ? kb / 1024 : null, stdout: r.stdout };
}

await withScratch(adminUrl, 'pipeline', async ({ work, dbUrl }) => {
  await bundle(path.join(ROOT, 'cli', 'src', 'main.ts'), BUNDLE, { split: true });
  // --inventory DIR keeps the generated files for the next run (the 4× inventory takes minutes to generate).
  const dir = values.inventory ? path.resolve(values.inventory, `plots-${plots}-seed-${values.seed}`) : path.join(work, 'batch');
  const t0 = performance.now();
  if (fs.existsSync(path.join(dir, 'trees.csv'))) process.stdout.write(`reusing the inventory in ${dir}\n`);
  else {
    const partial = `${dir}.partial`; // renamed when whole, so an interrupted run is not reused
    fs.rmSync(partial, { recursive: true, force: true });
    await generateInventory({ outDir: partial, plots, seed: Number(values.seed) });
    fs.rmSync(path.join(partial, 'truth.json'));
    fs.rmSync(dir, { recursive: true, force: true });
    fs.renameSync(partial, dir);
    process.stdout.write(`generated ${plots} plots in ${seconds(t0).toFixed(1)} s\n`);
  }

  const trees = path.join(dir, 'trees.csv');
  const head = Buffer.alloc(4096);
  const fd = fs.openSync(trees, 'r');
  const got = fs.readSync(fd, head, 0, head.length, 0);
  fs.closeSync(fd);
  const header = head.subarray(0, got).toString('utf8').split('\n')[0].split(',');
  psql(dbUrl, `create table bench_plain (${header.map((c) => `"${c}" text`).join(', ')})`);
  // The plain copy's own time varies by a factor of two from run to run here (checkpoints, page cache):
  // the median of three, the table emptied between them, is the yardstick of the ratios.
  const copies = [0, 1, 2].map((i) => psql(dbUrl, ...(i ? ['truncate bench_plain'] : []), `\\copy bench_plain from '${trees}' csv header`));
  const copy = [...copies].sort((a, b) => a - b)[1];
  process.stdout.write(`plain \\copy runs: ${copies.map((c) => c.toFixed(2)).join(', ')} s (median ${copy.toFixed(2)} s)\n`);
  const counter = new pg.Client({ connectionString: dbUrl });
  await counter.connect();
  const n = (await counter.query<{ n: number }>(`select count(*)::int n from bench_plain`)).rows[0].n;
  await counter.end();
  const env = { DATABASE_URL: dbUrl, STEMWISE_DATA_DIR: path.join(work, 'data'), STEMWISE_LOG_LEVEL: 'warn' };
  const upload = stemwise(['upload', dir, '--wait'], env, work);
  const recompute = stemwise(['recompute', '--now', '--all'], env, work);
  // The same with the heap cap docker-compose.yml gives the compute workers.
  const capped = stemwise(['recompute', '--now', '--all'], { ...env, NODE_OPTIONS: `${process.env.NODE_OPTIONS ?? ''} --max-old-space-size=256`.trim() }, work);
  const stageLines = recompute.stdout.slice(recompute.stdout.indexOf('stage times')).trimEnd().split('\n').slice(1);

  const mb = (x: number | null) => (x === null ? 'n/a' : `${Math.round(x)} MB`);
  const row = (step: string, s: number, peak = '') => `| ${step} | ${s.toFixed(2)} s | ${(s / copy).toFixed(2)}× | ${peak} |`;
  const lines = [
    `${n.toLocaleString('en')} stems, ${plots} plots; PostgreSQL of ${new URL(dbUrl).host}, jobs in-process, compiled`,
    '',
    '| step | time | ÷ plain \\copy | peak memory (RSS, one process with its worker threads) |',
    '|---|---|---|---|',
    row('`psql \\copy` of trees.csv into a plain text table (median of 3)', copy),
    row('`stemwise upload DIR --wait` (ingest, metrics, fits, summaries)', upload.s, mb(upload.peakMb)),
    row('`stemwise recompute --now --all` (the whole command)', recompute.s, mb(recompute.peakMb)),
    row('the same, heap capped as for compute workers (`--max-old-space-size=256`)', capped.s, mb(capped.peakMb)),
  ];
  for (const l of stageLines) {
    const m = /^\s+(.+?)\s{2,}(\d+\.\d\d) s/.exec(l);
    if (m) lines.push(row(`of which ${m[1]}`, Number(m[2])));
  }
  process.stdout.write(lines.join('\n') + '\n');
});
