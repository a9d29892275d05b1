import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Redis } from 'ioredis';
import { freePort, until } from './processes';

// A Redis server of one test's own, on a free port, without persistence: the test may FLUSHALL it
// (the shared Redis on 6379 serves every other test file and is never flushed).

export interface PrivateRedis {
  url: string;
  /** Deletes every key: what Redis losing its data looks like to the workers. */
  flushAll(): Promise<void>;
  keyCount(): Promise<number>;
  stop(): Promise<void>;
}

export async function startPrivateRedis(): Promise<PrivateRedis> {
  const port = await freePort();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-redis-'));
  const child: ChildProcess = spawn('redis-server', ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--dir', dir], {
    stdio: 'ignore',
  });
  const exited = new Promise<void>((r) => child.once('exit', () => r()));
  const spawnError = new Promise<never>((_, reject) => child.once('error', (err) => reject(new Error(`cannot start redis-server (is it installed?): ${err.message}`))));
  const url = `redis://127.0.0.1:${port}`;
  const admin = new Redis(url, { lazyConnect: true, maxRetriesPerRequest: 1, retryStrategy: () => 100 });
  admin.on('error', () => {});
  await Promise.race([spawnError, until('private redis-server answers', async () => (await admin.ping()) === 'PONG', 10_000, 50)]);
  return {
    url,
    async flushAll() {
      await admin.flushall();
    },
    async keyCount() {
      return admin.dbsize();
    },
    async stop() {
      admin.disconnect();
      child.kill('SIGKILL');
      await exited;
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
