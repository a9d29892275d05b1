import { execFile } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bundle, ROOT } from '../../scripts/build';
import { envFor, useServices, type TestServices } from '../support/services';

const run = promisify(execFile);

// The compiled build (npm run build) is what the services run in production: it must find the files
// that sit next to the sources (migrations, demo data) and run the whole pipeline like the sources do.
describe('the compiled build', () => {
  const outDir = path.join(ROOT, 'dist', `test-${crypto.randomBytes(4).toString('hex')}`);
  const outfile = path.join(outDir, 'stemwise.mjs');
  const work = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-build-'));
  let s: TestServices;
  // Ends a command still running when its test gave up (timed out), so no process outlives the file.
  const commands = new AbortController();
  beforeAll(async () => {
    s = await useServices();
    await bundle(path.join(ROOT, 'cli', 'src', 'main.ts'), outfile, { split: true }); // as `npm run build` (and `npm ci`, through `prepare`) does
  });
  afterAll(async () => {
    commands.abort();
    await s?.cleanup();
    fs.rmSync(outDir, { recursive: true, force: true });
    fs.rmSync(work, { recursive: true, force: true });
  });

  const stemwise = (args: string[], env: Record<string, string>) =>
    run(process.execPath, ['--input-type=module', '-e', `const { main } = await import(${JSON.stringify(outfile)}); process.exitCode = await main(${JSON.stringify(args)});`], {
      env: { ...env, STEMWISE_LOG_LEVEL: 'warn' },
      cwd: work,
      timeout: 120_000,
      signal: commands.signal,
    });

  it('inlines every source module and imports only installed packages', () => {
    for (const name of fs.readdirSync(outDir).filter((n) => n.endsWith('.mjs'))) {
      const text = fs.readFileSync(path.join(outDir, name), 'utf8');
      expect(text, name).not.toMatch(/from ["'][^"']*\.ts["']/);
      expect(text, name).not.toMatch(/from ["']@stemwise\//);
    }
  });

  it('loads no package before a command needs one: `stemwise --help` imports only node builtins', async () => {
    // Every file the entry imports statically (a chunk's own static imports, transitively), and the packages they import.
    const packages = new Set<string>();
    const seen = new Set<string>();
    const walk = (name: string) => {
      if (seen.has(name)) return;
      seen.add(name);
      const text = fs.readFileSync(path.join(outDir, name), 'utf8');
      for (const [, spec] of text.matchAll(/^import\s+(?:[^;]*?\sfrom\s+)?["']([^"']+)["']/gms)) {
        if (spec.startsWith('./')) walk(spec.slice(2));
        else packages.add(spec);
      }
    };
    walk('stemwise.mjs');
    expect(seen.size).toBeGreaterThan(1); // the pattern does find the chunks the entry imports
    expect([...packages].filter((p) => !p.startsWith('node:'))).toEqual([]);
    const { stdout } = await stemwise(['--help'], process.env as Record<string, string>);
    expect(stdout).toMatch(/^usage: stemwise <command>[^]*recompute\s+recomputes what new plots made stale/m);
  });

  it('migrates an embedded database from the committed migrations', async () => {
    const { stdout } = await stemwise(['migrate'], { ...(process.env as Record<string, string>), DATABASE_URL: '', STEMWISE_DATA_DIR: path.join(work, 'data') });
    // As many as the journal lists (adding a migration needs no edit here).
    const journal = JSON.parse(fs.readFileSync(path.join(ROOT, 'db', 'migrations', 'meta', '_journal.json'), 'utf8')) as { entries: unknown[] };
    expect(journal.entries.length).toBeGreaterThanOrEqual(6);
    expect(stdout).toMatch(new RegExp(`\\b${journal.entries.length} migrations applied`));
  });

  it('runs the demo on PostgreSQL and reaches the planted verdicts', async () => {
    const { stdout } = await stemwise(['demo', '--out', path.join(work, 'report')], envFor(s));
    expect(stdout).toMatch(/^wet\s+\d+\s+hump/m);
    expect(fs.existsSync(path.join(work, 'report', 'index.html'))).toBe(true);
  }, 130_000); // the command's own limit is 120 s
});
