import { execFileSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';

/** The demo generator's average stems per plot, measured on seed 3 (to size an inventory by its stems). */
export const STEMS_PER_DEMO_PLOT = 585;

/** Runs psql commands on `url`; returns the wall time in seconds. */
export function psql(url: string, ...commands: string[]): number {
  const t0 = performance.now();
  execFileSync('psql', ['-q', '-v', 'ON_ERROR_STOP=1', url, ...commands.flatMap((c) => ['-c', c])], { stdio: ['ignore', 'ignore', 'inherit'] });
  return (performance.now() - t0) / 1000;
}

/** A scratch database (made on the server of `adminUrl`) and a temporary folder for one run; both are removed afterwards. */
export async function withScratch<T>(adminUrl: string, topic: string, fn: (s: { work: string; dbUrl: string }) => Promise<T>): Promise<T> {
  const work = fs.mkdtempSync(path.join(os.tmpdir(), `stemwise-bench-${topic}-`));
  const dbName = `stemwise_bench_${crypto.randomBytes(4).toString('hex')}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  const url = new URL(adminUrl);
  url.pathname = `/${dbName}`;
  try {
    await admin.query(`create database "${dbName}"`);
    return await fn({ work, dbUrl: url.toString() });
  } finally {
    await admin.query(`drop database if exists "${dbName}" with (force)`).catch(() => {});
    await admin.end();
    fs.rmSync(work, { recursive: true, force: true });
  }
}
