import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Db } from '@stemwise/db';
import { filesInDir, submitBatch, type ServiceDeps } from '@stemwise/core';
import { generateInventory } from '@stemwise/demo-inventory';
import { createProcessors as ingestProcessors, importSpeciesFile } from '@stemwise/ingest';
import { InProcessQueue } from '@stemwise/platform';
import { envFor, testLogger, useServices, type TestServices } from '../support/services';
import { resultsDigest, type ResultsDigest } from './checksum';
import { allProcessors, FAULT_ENV } from './pipeline';
import { freePort, runStemwise, startWorker, stopAll } from './processes';

// Real `stemwise upload --wait` processes against running ingest, compute and report workers: four
// clients upload four different batches at once while a fifth uploads the first batch again. Every
// batch is loaded once and computed, the duplicate gets the same batch id, and the results equal those
// of the same batches uploaded one after another. Each upload's run keeps the height models stored by
// the first (docs/methods.md#height-model-releases), so which batch came first shows in the biomass
// until a model is released: both sides end with `recompute --all`, which releases the models fitted on
// every height, as the nightly run does beyond the tolerance.
describe('concurrent uploads', () => {
  const BATCHES = ['A', 'B', 'C', 'D'];
  const root = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-uploads-'));
  const dirs = BATCHES.map((b) => path.join(root, b));
  const speciesFile = path.join(root, 'species.csv');
  const stemsOf = new Map<string, number>();
  let s: TestServices;
  let baseline: ResultsDigest;

  /** A 12-plot demo inventory whose plot ids start with `prefix` (plots.csv and trees.csv only). */
  async function makeBatch(dir: string, prefix: string, seed: number): Promise<void> {
    await generateInventory({ outDir: dir, plots: 12, seed });
    for (const f of ['plots.csv', 'trees.csv']) {
      const [header, ...rows] = fs.readFileSync(path.join(dir, f), 'utf8').trimEnd().split('\n');
      fs.writeFileSync(path.join(dir, f), [header, ...rows.map((r) => `${prefix}${r}`)].join('\n') + '\n');
      if (f === 'trees.csv') stemsOf.set(prefix, rows.length);
    }
    if (!fs.existsSync(speciesFile)) fs.copyFileSync(path.join(dir, 'species.csv'), speciesFile);
    for (const f of ['species.csv', 'strata.csv', 'truth.json']) fs.rmSync(path.join(dir, f), { force: true });
  }

  /** The undisturbed run: the same batches uploaded one after another in this process, each computed before the next. */
  async function sequentialDigest(): Promise<ResultsDigest> {
    const storage = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-uploads-seq-'));
    const b = await useServices({ ...FAULT_ENV, STEMWISE_STORAGE_DIR: storage });
    try {
      await importSpeciesFile(b.db, speciesFile);
      const log = testLogger();
      const queue = new InProcessQueue(log);
      const deps: ServiceDeps = { config: b.config, db: b.db, log, queue };
      await queue.work({ ...ingestProcessors(deps), ...allProcessors(deps) }, { queues: ['ingest', 'compute', 'report', 'maintenance'] });
      for (const dir of dirs) {
        await submitBatch(deps, filesInDir(dir), {}, 'test');
        const failures = await queue.drain();
        if (failures.length) throw new Error(`sequential upload failed: ${JSON.stringify(failures)}`);
      }
      await queue.add({ name: 'maintenance.recompute', data: { trigger: 'manual', all: true }, jobId: 'release-models' });
      const failures = await queue.drain();
      if (failures.length) throw new Error(`sequential recompute --all failed: ${JSON.stringify(failures)}`);
      return await resultsDigest(b.db);
    } finally {
      await b.cleanup();
      fs.rmSync(storage, { recursive: true, force: true });
    }
  }

  const batchRows = (db: Db) =>
    db.query<{ id: string; state: string; stems_loaded: number; plots_loaded: number }>(`select id::text, state, stems_loaded, plots_loaded from batches order by created_at`);

  let env: Record<string, string>;
  beforeAll(async () => {
    await Promise.all(dirs.map((d, i) => makeBatch(d, BATCHES[i], 41 + i)));
    const storage = path.join(root, 'storage');
    s = await useServices({ ...FAULT_ENV, STEMWISE_STORAGE_DIR: storage });
    await importSpeciesFile(s.db, speciesFile);
    env = envFor(s, { ...FAULT_ENV, STEMWISE_STORAGE_DIR: storage, STEMWISE_CHUNK_PLOTS: '10', STEMWISE_PORT: String(await freePort()) });
    const [digest] = await Promise.all([sequentialDigest(), startWorker('ingest', env), startWorker('compute', env), startWorker('report', env)]);
    baseline = digest;
  }, 150_000);
  afterAll(async () => {
    await stopAll();
    await s?.cleanup();
    fs.rmSync(root, { recursive: true, force: true });
  });

  it('loads each of four batches once, recognises the same batch uploaded twice at once, and computes them all', async () => {
    const uploads = await Promise.all([...dirs, dirs[0]].map((dir) => runStemwise(['upload', dir, '--wait'], env, 120_000)));
    for (const u of uploads) expect(u.code, u.stderr).toBe(0);

    // The same batch twice at once: one client stored it, the other was given the same id.
    const ids = uploads.map((u) => u.stdout.trim().match(/([0-9a-f-]{36})$/)![1]);
    expect(ids[4]).toBe(ids[0]);
    expect(new Set(ids.slice(0, 4)).size).toBe(4);
    expect(uploads.filter((u, i) => (i === 0 || i === 4) && /^already received as /.test(u.stdout.trim()))).toHaveLength(1);

    // Four batches, each loaded once with exactly its stems, all computed.
    const rows = await batchRows(s.db);
    expect(rows).toHaveLength(4);
    for (const [i, prefix] of BATCHES.entries()) {
      const row = rows.find((r) => r.id === ids[i])!;
      expect(row).toMatchObject({ state: 'computed', stems_loaded: stemsOf.get(prefix), plots_loaded: 12 });
      const [{ n }] = await s.db.query<{ n: number }>(`select count(*)::int n from stems st join plot_visits v on v.id = st.visit_id where v.batch_id = $1`, [ids[i]]);
      expect(n).toBe(stemsOf.get(prefix));
    }

    // One run at a time: the batches that arrived while the first run ran were computed by the run after it, once.
    const runs = await s.db.query<{ state: string; visits: number }>(`select state, visits from recompute_runs order by started_at`);
    expect(runs.every((r) => r.state === 'done')).toBe(true);
    const [{ overlapping }] = await s.db.query<{ overlapping: number }>(
      `select count(*)::int overlapping from recompute_runs a join recompute_runs b on a.id < b.id
        where a.started_at < b.finished_at and b.started_at < a.finished_at`,
    );
    expect(overlapping).toBe(0);
    const release = await runStemwise(['recompute', '--now', '--all'], env, 120_000);
    expect(release.code, release.stderr).toBe(0);
    const digest = await resultsDigest(s.db);
    expect(digest.counts.stems).toBe([...stemsOf.values()].reduce((a, b) => a + b, 0));
    expect(digest.counts.staleVisits + digest.counts.staleWork).toBe(0);
    // The number of intermediate summary versions depends on how the runs interleaved; everything else must match.
    const { summaryVersions: _a, ...counts } = digest.counts;
    const { summaryVersions: _b, ...expected } = baseline.counts;
    expect({ counts, digests: digest.digests }).toEqual({ counts: expected, digests: baseline.digests });
  }, 150_000);
});
