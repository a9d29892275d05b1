import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import semver from 'semver';
import { describe, expect, it } from 'vitest';

const ROOT = path.resolve(__dirname, '../..');
const read = (file: string) => fs.readFileSync(path.join(ROOT, file), 'utf8');

// The lowest release of each supported Node line that package.json "engines" admits.
const LOWEST = ['20.19.0', '22.13.0'];

describe('supported Node versions', () => {
  const engines = (JSON.parse(read('package.json')) as { engines: { node: string } }).engines.node;

  it('engines admits Node 20 and 22 LTS, from their lowest supported release', () => {
    for (const v of LOWEST) expect(semver.satisfies(v, engines), `${v} in ${engines}`).toBe(true);
    expect(semver.satisfies('20.18.0', engines)).toBe(false); // the test tooling needs 20.19
  });

  it('no locked package declares an engine that excludes them (npm ci would warn EBADENGINE)', () => {
    const lock = JSON.parse(read('package-lock.json')) as { packages: Record<string, { engines?: { node?: string } }> };
    const excluding = Object.entries(lock.packages).flatMap(([name, p]) =>
      LOWEST.filter((v) => p.engines?.node && !semver.satisfies(v, p.engines.node)).map((v) => `${name} wants ${p.engines!.node}, not ${v}`),
    );
    expect(excluding).toEqual([]);
  });

  it('the image runs Node 22', () => {
    expect(read('Dockerfile')).toMatch(/^FROM node:22-bookworm-slim$/m);
  });

  it('test:node22 fails loudly when it cannot get Node 22', async () => {
    const env = {
      ...process.env,
      STEMWISE_NODE22_DIR: fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-node22-')),
      npm_config_registry: 'http://127.0.0.1:1/',
      npm_config_fetch_retries: '0',
      npm_config_offline: 'false',
    };
    const r = await promisify(execFile)('bash', [path.join(ROOT, 'scripts/test-node22.sh')], { cwd: ROOT, env, timeout: 60_000 }).then(
      () => ({ code: 0, stderr: '' }),
      (e: { code: number; stderr: string }) => e,
    );
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('test:node22: FAILED: could not install node-');
    fs.rmSync(env.STEMWISE_NODE22_DIR, { recursive: true, force: true });
  });
});
