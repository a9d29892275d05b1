// Benchmark of the region summary endpoint: 100 concurrent keep-alive connections for 10 s on
// loopback against GET /v1/regions/:region/summary; prints requests/s and latency percentiles as the
// client sees them and as the server measures them. Target: p99 under 50 ms.
//
//   npx tsx scripts/bench/report.ts [--connections 100] [--seconds 10] [--plots 600] [--healthz] [--profile]
//
// --healthz drives /healthz instead (the floor of this machine and client); --profile writes a CPU
// profile of the server process to report-prof in the system temporary folder (os.tmpdir()).
//
// The server runs in a child process (so the load loop does not share its event loop) on its own
// database: a scratch database created on the PostgreSQL server of DATABASE_URL (dropped at the end),
// or an embedded PGlite in a temporary folder when DATABASE_URL is unset. It is seeded with an
// invented region of `--plots` plots over three forest types, their fits and one summaries run.
import { spawn, spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { fileURLToPath } from 'node:url';
import { Pool } from 'undici';
import pg from 'pg';
import { createLogger, InProcessQueue, loadConfig } from '@stemwise/platform';
import { markStale, migrateDatabase, openDatabase, syncForestTypes } from '@stemwise/db';
import { createRng, type ServiceDeps } from '@stemwise/core';
import { storeFits } from '@stemwise/compute';
import { buildServer, createProcessors } from '@stemwise/report';
import { jobContext, seedForestArea, seedPlots, seedRun, seedSpecies, type FixturePlot } from '../../test/report/fixture';
import { createToken } from '../../test/report/tokens';

const REGION = 'Northvale';

/** Deterministic pseudo-random numbers (the seeded generator of @stemwise/core), so every run seeds the same region. */
const random = (seed: number): (() => number) => createRng(seed).next;

function inventedPlots(n: number): FixturePlot[] {
  const r = random(20261201);
  const types = ['wet', 'moist', 'dry'];
  return Array.from({ length: n }, (_, i) => {
    const forestType = types[i % 3];
    const ba = 8 + 30 * r();
    const di = r();
    const agb = ba * (8 + 4 * r());
    const shares = [r(), r(), r(), 0.2 * r()];
    const sum = shares.reduce((a, b) => a + b, 0);
    return {
      key: `NV-${String(i + 1).padStart(5, '0')}`,
      region: REGION,
      forestType,
      date: `2026-0${1 + (i % 9)}-1${i % 10}`,
      latitude: -12 + r(),
      longitude: 34 + r(),
      metrics: {
        stems_ha: 200 + 600 * r(),
        basal_area_m2_ha: ba,
        agb_mg_ha: agb,
        carbon_mg_ha: 0.47 * agb,
        fisher_alpha: 4 + 12 * di * (1 - di) * 4 + 2 * r(),
        richness: Math.round(5 + 25 * r()),
        disturbance_index: di,
        pioneer_ba_share: shares[0] / sum,
        light_demander_ba_share: shares[1] / sum,
        shade_tolerant_ba_share: shares[2] / sum,
        unassigned_ba_share: shares[3] / sum,
      },
    };
  });
}

/** Child: seed a database, run the summaries job, serve on loopback, print the URL and a reader token. */
async function serve(plots: number): Promise<void> {
  const env = loadConfig();
  const log = createLogger('warn');
  let databaseUrl: string | undefined;
  let dropDb = async () => {};
  let dataDir: string | null = null;
  if (env.databaseUrl) {
    const name = `stemwise_bench_report_${crypto.randomBytes(4).toString('hex')}`;
    const admin = new pg.Client({ connectionString: env.databaseUrl });
    await admin.connect();
    await admin.query(`create database "${name}"`);
    await admin.end();
    const u = new URL(env.databaseUrl);
    u.pathname = `/${name}`;
    databaseUrl = u.toString();
    dropDb = async () => {
      const a = new pg.Client({ connectionString: env.databaseUrl });
      await a.connect();
      await a.query(`drop database if exists "${name}" with (force)`);
      await a.end();
    };
  } else {
    dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-bench-'));
  }
  // every connection comes from loopback: the per-client request limit would measure 429s, not summaries
  const config = loadConfig({ DATABASE_URL: databaseUrl, STEMWISE_DATA_DIR: dataDir ?? env.dataDir, STEMWISE_LOG_LEVEL: 'warn', STEMWISE_RATE_LIMIT_PER_MINUTE: '1000000' });
  const db = await openDatabase(config);
  await migrateDatabase(db);
  await syncForestTypes(db, config.forestTypes);
  await seedSpecies(db);
  await seedPlots(db, inventedPlots(plots));
  for (const [t, ha] of [['wet', 52_000], ['moist', 31_000], ['dry', 17_500]] as const) await seedForestArea(db, REGION, t, ha);
  await markStale(db, 'summary', [REGION]);
  const deps: ServiceDeps = { config, db, log, queue: new InProcessQueue(log) };
  await storeFits(deps, ['wet', 'moist', 'dry']); // the charts of the page are drawn from the stored fits
  await createProcessors(deps)['report.summaries']!({ runId: await seedRun(db) }, jobContext(log));
  const token = (await createToken(db, 'reader', [REGION], 'bench')).token;
  const app = await buildServer(deps);
  // Server-side time of each answer (request received → response written), free of the client's scheduling.
  let serverTimes: number[] = [];
  app.addHook('onResponse', async (_request, reply) => void serverTimes.push(reply.elapsedTime));
  await app.listen({ host: '127.0.0.1', port: 0 });
  const { port } = app.server.address() as { port: number };
  process.on('message', (m) => {
    if (m === 'reset') serverTimes = [];
    if (m === 'stats') process.send!(serverTimes);
  });
  process.stdout.write(JSON.stringify({ url: `http://127.0.0.1:${port}`, token }) + '\n');
  const stop = async () => {
    await app.close();
    await db.close();
    await dropDb();
    if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
    process.exit(0);
  };
  process.once('SIGTERM', () => void stop());
  process.once('SIGINT', () => void stop());
}

function percentile(sorted: Float64Array, p: number): number {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
}

/** Parent: start the child, drive the load, print the figures. */
async function load(connections: number, seconds: number, plots: number): Promise<void> {
  const script = fileURLToPath(import.meta.url);
  const child = spawn(process.execPath, [...(process.argv.includes('--profile') ? ['--cpu-prof', `--cpu-prof-dir=${path.join(os.tmpdir(), 'report-prof')}`] : []), '--import', 'tsx', script, '--serve', '--plots', String(plots)], { stdio: ['ignore', 'pipe', 'inherit', 'ipc'] });
  const ready = await new Promise<{ url: string; token: string }>((resolve, reject) => {
    let out = '';
    child.stdout!.on('data', (d: Buffer) => {
      out += d.toString();
      const line = out.split('\n').find((l) => l.startsWith('{'));
      if (line) resolve(JSON.parse(line));
    });
    child.once('exit', (code) => reject(new Error(`the server process exited (${code}) before it was ready`)));
  });
  const pathName = process.argv.includes("--healthz") ? "/healthz" : `/v1/regions/${REGION}/summary`;
  const headers = { authorization: `Bearer ${ready.token}` };
  const pool = new Pool(ready.url, { connections, pipelining: 1, keepAliveTimeout: 30_000 });
  try {
    // warm-up: fills the cache and opens the connections
    const first = await pool.request({ path: pathName, method: 'GET', headers });
    const bytes = (await first.body.arrayBuffer()).byteLength;
    if (first.statusCode !== 200) throw new Error(`warm-up answered ${first.statusCode}`);
    await Promise.all(Array.from({ length: connections }, async () => (await pool.request({ path: pathName, method: 'GET', headers })).body.dump()));

    child.send('reset');
    const latencies: number[] = [];
    let failures = 0;
    const end = performance.now() + seconds * 1000;
    const t0 = performance.now();
    await Promise.all(
      Array.from({ length: connections }, async () => {
        while (performance.now() < end) {
          const start = performance.now();
          try {
            const res = await pool.request({ path: pathName, method: 'GET', headers });
            await res.body.dump();
            if (res.statusCode !== 200) failures++;
          } catch {
            failures++;
          }
          latencies.push(performance.now() - start);
        }
      }),
    );
    const elapsed = (performance.now() - t0) / 1000;
    const sorted = Float64Array.from(latencies).sort();
    const server = await new Promise<number[]>((resolve) => {
      child.once('message', (m) => resolve(m as number[]));
      child.send('stats');
    });
    const serverSorted = Float64Array.from(server).sort();
    const fmt = (v: number) => `${v.toFixed(2)} ms`;
    const p99 = percentile(sorted, 99);
    process.stdout.write(
      [
        `region summary endpoint (GET ${pathName}, ${bytes} bytes JSON, ${plots} plots): ${connections} connections, ${elapsed.toFixed(1)} s on loopback`,
        `  requests/s  ${(latencies.length / elapsed).toFixed(0)}   (${latencies.length} requests, ${failures} failed)`,
        `  latency     p50 ${fmt(percentile(sorted, 50))}   p90 ${fmt(percentile(sorted, 90))}   p99 ${fmt(p99)}   max ${fmt(sorted[sorted.length - 1])}   (seen by the client)`,
        `  in server   p50 ${fmt(percentile(serverSorted, 50))}   p90 ${fmt(percentile(serverSorted, 90))}   p99 ${fmt(percentile(serverSorted, 99))}   max ${fmt(serverSorted[serverSorted.length - 1])}   (request received → answer written)`,
        `  load average at the end: ${os.loadavg().map((l) => l.toFixed(1)).join(' ')} on ${os.cpus().length} cores (client and server share them)`,
        `  target p99 < 50 ms: ${p99 < 50 ? 'met' : 'NOT met'} (Node client)`,
        '',
      ].join('\n'),
    );
    // A second measurement with wrk (Debian package `wrk`), a C load generator that leaves more of the
    // two cores to the server than the Node client above does.
    const wrk = spawnSync('wrk', ['-t1', `-c${connections}`, `-d${seconds}s`, '--latency', '-H', `Authorization: Bearer ${ready.token}`, `${ready.url}${pathName}`], { encoding: 'utf8' });
    if (wrk.error) {
      process.stdout.write('  wrk: not installed (apt-get install wrk) — only the Node client measured\n');
    } else {
      const rps = /Requests\/sec:\s+([\d.]+)/.exec(wrk.stdout)?.[1];
      const q = (pct: string) => new RegExp(`\\s${pct}%\\s+([\\d.]+)(us|ms|s)`).exec(wrk.stdout);
      const ms = (m: RegExpExecArray | null) => (m ? Number(m[1]) * (m[2] === 'us' ? 0.001 : m[2] === 's' ? 1000 : 1) : NaN);
      const wrkP99 = ms(q('99'));
      process.stdout.write(
        [
          `  wrk, ${connections} connections, ${seconds} s: requests/s ${rps}   p50 ${fmt(ms(q('50')))}   p90 ${fmt(ms(q('90')))}   p99 ${fmt(wrkP99)}`,
          `  target p99 < 50 ms: ${wrkP99 < 50 ? 'met' : 'NOT met'} (wrk)`,
          '',
        ].join('\n'),
      );
    }
  } finally {
    await pool.close();
    child.kill('SIGTERM');
    await new Promise((r) => child.once('exit', r));
  }
}

const { values } = parseArgs({
  options: {
    serve: { type: 'boolean', default: false },
    healthz: { type: 'boolean', default: false },
    profile: { type: 'boolean', default: false },
    connections: { type: 'string', default: '100' },
    seconds: { type: 'string', default: '10' },
    plots: { type: 'string', default: '600' },
  },
});
const plots = Number(values.plots);
if (values.serve) await serve(plots);
else await load(Number(values.connections), Number(values.seconds), plots);
