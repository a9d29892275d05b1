// Benchmark of the whole pipeline as a user runs it, against the floor of any load: `psql \copy` of the
// same trees file into a plain table of text columns. Generates the demo inventory (--stems, about 1.36
// million by default, in plots of the generator's ~585 stems; or --plots), then in a scratch database of the PostgreSQL of DATABASE_URL (or
// the local server), with jobs in-process (no Redis), times:
//   \copy of trees.csv into a plain table · `stemwise upload DIR --wait` (ingest, metrics, fits,
//   summaries) · `stemwise recompute --now --all`, and the stage times that command prints;
// each with its ratio to the \copy. The commands run compiled (dist/stemwise.mjs, built first).
//
//   npm run bench -- --only pipeline [--stems 1360000 | --plots N] [--seed 7]
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import pg from 'pg';
import { generateInventory } from '@stemwise/demo-inventory';
import { bundle, BUNDLE, ROOT } from '../build';
import { psql, STEMS_PER_DEMO_PLOT, withScratch } from './support/scratch';

const { values } = parseArgs({ options: { stems: { type: 'string', default: '1360000' }, plots: { type: 'string' }, seed: { type: 'string', default: '7' } } });
const plots = values.plots ? Number(values.plots) : Math.max(1, Math.round(Number(values.stems) / STEMS_PER_DEMO_PLOT));
const adminUrl = process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:5432/postgres';
const BIN = path.join(ROOT, 'bin', 'stemwise.mjs');

const seconds = (t0: number) => (performance.now() - t0) / 1000;

/** Runs `stemwise …` compiled, with jobs in-process; returns its wall time and stdout. */
function stemwise(args: string[], env: Record<string, string>): { s: number; stdout: string } {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, [BIN, ...args], { env: { ...process.env, ...env, REDIS_URL: '' }, encoding: 'utf8', maxBuffer: 1 << 24 });
  const s = seconds(t0);
  if (r.status !== 0) throw new Error(`stemwise ${args.join(' ')} failed (${r.status}): ${r.stderr}`);
  return { s, stdout: r.stdout };
}

await withScratch(adminUrl, 'pipeline', async ({ work, dbUrl }) => {
  await bundle(path.join(ROOT, 'cli', 'src', 'main.ts'), BUNDLE, { split: true });
  const dir = path.join(work, 'batch');
  let t0 = performance.now();
  await generateInventory({ outDir: dir, plots, seed: Number(values.seed) });
  fs.rmSync(path.join(dir, 'truth.json'));
  process.stdout.write(`generated ${plots} plots in ${seconds(t0).toFixed(1)} s\n`);

  const trees = path.join(dir, 'trees.csv');
  const header = fs.readFileSync(trees, 'utf8').slice(0, 4096).split('\n')[0].split(',');
  psql(dbUrl, `create table bench_plain (${header.map((c) => `"${c}" text`).join(', ')})`);
  const copy = psql(dbUrl, `\\copy bench_plain from '${trees}' csv header`);
  const counter = new pg.Client({ connectionString: dbUrl });
  await counter.connect();
  const n = (await counter.query<{ n: number }>(`select count(*)::int n from bench_plain`)).rows[0].n;
  await counter.end();
  const env = { DATABASE_URL: dbUrl, STEMWISE_DATA_DIR: path.join(work, 'data'), STEMWISE_LOG_LEVEL: 'warn' };
  const upload = stemwise(['upload', dir, '--wait'], env);
  const recompute = stemwise(['recompute', '--now', '--all'], env);
  const stageLines = recompute.stdout.slice(recompute.stdout.indexOf('stage times')).trimEnd().split('\n').slice(1);

  const row = (step: string, s: number) => `| ${step} | ${s.toFixed(2)} s | ${(s / copy).toFixed(2)}× |`;
  const lines = [
    `${n.toLocaleString('en')} stems, ${plots} plots; PostgreSQL of ${new URL(dbUrl).host}, jobs in-process, compiled`,
    '',
    '| step | time | ÷ plain \\copy |',
    '|---|---|---|',
    row('`psql \\copy` of trees.csv into a plain text table', copy),
    row('`stemwise upload DIR --wait` (ingest, metrics, fits, summaries)', upload.s),
    row('`stemwise recompute --now --all` (the whole command)', recompute.s),
  ];
  for (const l of stageLines) {
    const m = /^\s+(.+?)\s{2,}(\d+\.\d\d) s/.exec(l);
    if (m) lines.push(row(`of which ${m[1]}`, Number(m[2])));
  }
  process.stdout.write(lines.join('\n') + '\n');
});
