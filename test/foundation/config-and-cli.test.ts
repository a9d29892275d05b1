import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BullQueue } from '@stemwise/platform/bullmq';
import { ConfigError, ServiceUnavailableError, SETTINGS, createLogger, loadConfig, oneLine } from '@stemwise/platform';
import { envFor, useServices, type TestServices } from '../support/services';

const run = promisify(execFile);
const BIN = path.resolve(__dirname, '../../bin/stemwise.mjs');

async function stemwise(args: string[], env: Record<string, string | undefined>) {
  try {
    const r = await run(process.execPath, [BIN, ...args], { env: env as NodeJS.ProcessEnv, timeout: 60_000 });
    return { code: 0, stdout: r.stdout, stderr: r.stderr };
  } catch (err) {
    const e = err as { code: number; stdout: string; stderr: string };
    return { code: e.code, stdout: e.stdout, stderr: e.stderr };
  }
}

describe('configuration', () => {
  it('has documented defaults', () => {
    const c = loadConfig({});
    expect(c.databaseUrl).toBeUndefined();
    expect(c.forestTypes.map((t) => t.code)).toEqual(['wet', 'moist', 'dry']);
    expect(c.nightlyCron).toBe('0 2 * * *');
  });
  it('is listed in the README exactly as SETTINGS says (the table is written from it)', () => {
    const readme = fs.readFileSync(path.resolve(__dirname, '../../README.md'), 'utf8');
    const rows = [...readme.matchAll(/^\| `([A-Z_]+)` \| (.*) \| (.*) \|$/gm)].map((m) => ({ name: m[1], default: m[2], meaning: m[3] }));
    expect(rows).toEqual(SETTINGS.map((s) => ({ ...s })));
  });
  it('reads the report service limits and the trusted proxy', () => {
    const c = loadConfig({ STEMWISE_TRUST_PROXY: '10.0.0.1,10.1.0.0/16', STEMWISE_MAX_UNPACKED_MB: '3', STEMWISE_REQUEST_TIMEOUT_SECONDS: '2' });
    expect(c.trustProxy).toEqual(['10.0.0.1', '10.1.0.0/16']);
    expect(c.maxUnpackedBytes).toBe(3 * 1024 ** 2);
    expect(c.requestTimeoutMs).toBe(2000);
    expect(loadConfig({ STEMWISE_TRUST_PROXY: '1' }).trustProxy).toBe(1);
    expect(loadConfig({}).trustProxy).toBe(false);
    expect(() => loadConfig({ STEMWISE_TRUST_PROXY: 'everyone' })).toThrow(/^STEMWISE_TRUST_PROXY: /);
  });
  it('names the setting of a bad value', () => {
    expect(() => loadConfig({ STEMWISE_PORT: 'eighty' })).toThrow(ConfigError);
    expect(() => loadConfig({ DATABASE_URL: 'mysql://x' })).toThrow(/^DATABASE_URL: /);
    expect(() => loadConfig({ STEMWISE_FOREST_TYPES: 'wet:swampy' })).toThrow(/STEMWISE_FOREST_TYPES/);
  });
});

describe('stemwise migrate', () => {
  let s: TestServices;
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-migrate-'));
  beforeAll(async () => void (s = await useServices()));
  afterAll(async () => {
    await s?.cleanup();
    fs.rmSync(dataDir, { recursive: true, force: true });
  });
  const bare = { ...process.env, DATABASE_URL: undefined, REDIS_URL: undefined };

  it('creates the embedded database, and a second run changes nothing', async () => {
    const env = { ...bare, STEMWISE_DATA_DIR: dataDir };
    const first = await stemwise(['migrate'], env);
    expect(first.stderr).toBe('');
    expect(first.code).toBe(0);
    expect(first.stdout).toMatch(/embedded/);
    const listing = () => fs.readdirSync(path.join(dataDir, 'pgdata')).sort();
    const before = listing();
    const second = await stemwise(['migrate'], env);
    expect(second.code).toBe(0);
    expect(second.stdout).toBe(first.stdout);
    expect(listing()).toEqual(before);
  });

  it('migrates a PostgreSQL server twice without change', async () => {
    const env = envFor(s);
    const first = await stemwise(['migrate'], env);
    expect(first.code).toBe(0);
    const tables = async () => (await s.db.query<{ t: string }>(`select table_name t from information_schema.tables where table_schema='public' order by 1`)).map((r) => r.t);
    const before = await tables();
    expect(before).toContain('stems');
    const second = await stemwise(['migrate'], env);
    expect(second.code).toBe(0);
    expect(await tables()).toEqual(before);
  });

  it('gives one line naming DATABASE_URL when PostgreSQL is unreachable', async () => {
    const r = await stemwise(['migrate'], { ...bare, DATABASE_URL: 'postgres://postgres@127.0.0.1:1/nowhere' });
    expect(r.code).toBe(1);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^stemwise: DATABASE_URL: cannot reach PostgreSQL/);
  });

  it('gives one line naming REDIS_URL when Redis is unreachable', async () => {
    const err = await BullQueue.open({ url: 'redis://127.0.0.1:1', prefix: 'x', attempts: 1, log: createLogger('silent') }).catch((e) => e);
    expect(err).toBeInstanceOf(ServiceUnavailableError);
    expect(oneLine(err)).toMatch(/^REDIS_URL: cannot reach Redis at redis:\/\/127.0.0.1:1 /);
    expect(oneLine(err)).not.toContain('\n');
  });
});
