import { execFile, spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { main } from '@stemwise/cli';
import { envFor, useServices, type TestServices } from '../support/services';
import { PLOTS, SPECIES, tempDir, TREES, writeUpload } from './support';

const run = promisify(execFile);
const BIN = path.resolve(__dirname, '../../bin/stemwise.mjs');

describe('stemwise upload, batch show and species import', () => {
  let s: TestServices;
  let env: Record<string, string | undefined>;
  beforeAll(async () => {
    s = await useServices();
    // PostgreSQL but no Redis: the jobs of a command run in its own process.
    env = { ...envFor(s, { STEMWISE_STORAGE_DIR: tempDir('stemwise-storage-') }), REDIS_URL: undefined };
  });
  afterAll(async () => s?.cleanup());

  // The CLI's main() in this process (as bin/stemwise.mjs calls it), output captured: spawning costs seconds.
  async function stemwise(...args: string[]) {
    return stemwiseWith(env, ...args);
  }

  async function stemwiseWith(env: Record<string, string | undefined>, ...args: string[]) {
    let stdout = '';
    let stderr = '';
    const o = vi.spyOn(process.stdout, 'write').mockImplementation((c: string | Uint8Array) => ((stdout += String(c)), true));
    const e = vi.spyOn(process.stderr, 'write').mockImplementation((c: string | Uint8Array) => ((stderr += String(c)), true));
    try {
      return { code: await main(args, env), stdout, stderr };
    } finally {
      o.mockRestore();
      e.mockRestore();
    }
  }

  /** A real process, as users run it. */
  async function spawned(...args: string[]) {
    try {
      const r = await run(process.execPath, [BIN, ...args], { env: env as NodeJS.ProcessEnv, timeout: 120_000 });
      return { code: 0, stdout: r.stdout, stderr: r.stderr };
    } catch (err) {
      const e = err as { code: number; stdout: string; stderr: string };
      return { code: e.code, stdout: e.stdout, stderr: e.stderr };
    }
  }

  it('uploads a folder, waits for it, recognises it again and shows it as text, JSON and CSV', async () => {
    const dir = writeUpload({ plots: PLOTS, trees: TREES, species: SPECIES });
    const up = await spawned('upload', dir, '--wait');
    expect(up.code, up.stderr).toBe(0);
    const id = up.stdout.trim();
    expect(id).toMatch(/^[0-9a-f-]{36}$/);
    expect(up.stderr).toMatch(/9 stems loaded/);

    const again = await stemwise('upload', dir);
    expect(again.stdout.trim()).toBe(`already received as ${id}`);

    const csvFile = path.join(tempDir(), 'errors.csv');
    const text = await stemwise('batch', 'show', id, '--errors-csv', csvFile, '--all-issues');
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(new RegExp(`^batch ${id}: (loaded|computed)`));
    expect(text.stdout).toContain('plausibility_species_unknown (1)');
    expect(fs.readFileSync(csvFile, 'utf8')).toMatch(/^severity,rule,file,line,column,value,message\nwarning,plausibility_species_genus_only,trees\.csv,5,/);
    const json = JSON.parse((await stemwise('batch', 'show', id, '--format', 'json')).stdout);
    expect(json).toMatchObject({ id, counts: { stemsLoaded: 9, plotsLoaded: 3, errors: 0 } });
  });

  it('exits 1 with the grouped errors when a waited-for batch is rejected', async () => {
    const dir = writeUpload({ plots: PLOTS.replace(/MW-/g, 'KX-').replace(/27\./g, '28.'), trees: TREES.replace(/MW-/g, 'KX-').replace('24.5,18.2', '0,18.2') });
    const up = await stemwise('upload', '--plots', path.join(dir, 'plots.csv'), '--trees', path.join(dir, 'trees.csv'), '--wait');
    expect(up.code).toBe(1);
    expect(up.stderr).toMatch(/: rejected/);
    expect(up.stderr).toMatch(/field_out_of_range \(1\)/);
    expect(up.stderr).toContain('trees.csv:2  dbh_cm is 0; diameters must be above 0 cm and at most 500 cm');
  });

  it('refuses bad arguments with exit code 2', async () => {
    expect((await stemwise('upload', '--plots', 'nowhere.csv', '--trees', 'nowhere.csv')).code).toBe(2);
    expect((await stemwise('upload', tempDir())).code).toBe(2);
    expect((await stemwise('upload', writeUpload({ plots: PLOTS, trees: TREES }), '--decimal-comma')).code).toBe(2);
    expect((await stemwise('batch', 'show')).code).toBe(2);
  });

  it('imports a species list, and refuses one with errors', async () => {
    const good = path.join(writeUpload({ species: `${SPECIES}\nQuill aurea,Quillaceae,pioneer,0.33,` }), 'species.csv');
    const ok = await stemwise('species', 'import', good);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stdout).toMatch(/^species reference version \d+: 4 species; \d+ plot visits marked for recomputation/);
    const bad = path.join(writeUpload({ species: `${SPECIES}\nQuill aurea,Quillaceae,climax,0.33,` }), 'species.csv');
    const no = await stemwise('species', 'import', bad);
    expect(no.code).toBe(1);
    expect(no.stderr).toContain('error field_not_allowed species.csv:5  guild is "climax"');
  });

  it('with Redis and no worker, says so while it waits, and goes on once a worker starts', async () => {
    const withRedis = { ...env, REDIS_URL: s.redisUrl };
    const dir = writeUpload({ plots: PLOTS.replace(/MW-/g, 'NW-').replace(/27\./g, '31.'), trees: TREES.replace(/MW-/g, 'NW-').replace('stump,logged', 'stump,') });
    const waiting = stemwiseWith(withRedis, 'upload', dir, '--wait');
    await new Promise((r) => setTimeout(r, 6_500)); // past the first worker check (5 s)
    const worker = spawn(process.execPath, [BIN, 'serve', 'ingest'], { env: withRedis as NodeJS.ProcessEnv, stdio: 'ignore' });
    try {
      const up = await waiting;
      expect(up.stderr).toContain("no ingest worker is running, so the batch is not being read yet; start one with 'stemwise serve ingest'");
      expect(up.code).toBe(1); // the batch was then read by the worker, and rejected
      expect(up.stderr).toContain('row_stump_cause_missing (1)');
    } finally {
      worker.kill('SIGTERM');
      await new Promise((r) => worker.once('exit', r));
    }
  });

  it('with Redis, waits by watching the batch row while a separate worker validates it', async () => {
    const withRedis = { ...env, REDIS_URL: s.redisUrl };
    const worker = spawn(process.execPath, [BIN, 'serve', 'ingest'], { env: withRedis as NodeJS.ProcessEnv, stdio: 'ignore' });
    try {
      const dir = writeUpload({ plots: PLOTS.replace(/MW-/g, 'RQ-').replace(/27\./g, '29.'), trees: TREES.replace(/MW-/g, 'RQ-').replace('stump,logged', 'stump,') });
      const up = await stemwiseWith(withRedis, 'upload', dir, '--wait');
      expect(up.code).toBe(1);
      expect(up.stdout.trim()).toMatch(/^[0-9a-f-]{36}$/);
      expect(up.stderr).toContain('row_stump_cause_missing (1)');
      expect(up.stderr).toContain('trees.csv:6  status is stump but stump_cause is empty');
    } finally {
      worker.kill('SIGTERM');
      await new Promise((r) => worker.once('exit', r));
    }
  });
});
