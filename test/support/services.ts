import crypto from 'node:crypto';
import pg from 'pg';
import { Redis } from 'ioredis';
import { inject } from 'vitest';
import { createLogger, loadConfig, type Config } from '@stemwise/platform';
import { openDatabase, syncForestTypes, type Db } from '@stemwise/db';

export interface TestServices {
  /** URL of this file's own database (a clone of the migrated template). */
  databaseUrl: string;
  redisUrl: string;
  /** Queue prefix of this file, so files never see each other's jobs. */
  prefix: string;
  /** Configuration as the services would parse it, pointing at this file's database and prefix. */
  config: Config;
  db: Db;
  /** Drops the database and the Redis keys; call in afterAll. */
  cleanup(): Promise<void>;
}

/** The environment a process of this test file would run with (for spawning real CLI or worker processes). */
export function envFor(s: Pick<TestServices, 'databaseUrl' | 'redisUrl' | 'prefix'>, extra: Record<string, string> = {}): Record<string, string> {
  return {
    ...(process.env as Record<string, string>),
    DATABASE_URL: s.databaseUrl,
    REDIS_URL: s.redisUrl,
    STEMWISE_QUEUE_PREFIX: s.prefix,
    STEMWISE_LOG_LEVEL: 'warn',
    ...extra,
  };
}

/** A fresh database of this file's own, cloned from the migrated template, and a Redis prefix. */
export async function useServices(extraEnv: Record<string, string> = {}): Promise<TestServices> {
  const services = inject('services');
  if ('error' in services) throw new Error(services.error);
  const template = inject('templateDb');
  const name = `stemwise_t_${crypto.randomBytes(6).toString('hex')}`;
  const admin = new pg.Client({ connectionString: services.databaseUrl });
  await admin.connect();
  try {
    await admin.query(`create database "${name}" template "${template}"`);
  } finally {
    await admin.end();
  }
  const url = new URL(services.databaseUrl);
  url.pathname = `/${name}`;
  const databaseUrl = url.toString();
  const prefix = `swt-${crypto.randomBytes(5).toString('hex')}`;
  const config = loadConfig({ DATABASE_URL: databaseUrl, REDIS_URL: services.redisUrl, STEMWISE_QUEUE_PREFIX: prefix, STEMWISE_LOG_LEVEL: 'warn', ...extraEnv });
  const db = await openDatabase(config, { poolSize: 4 });
  await syncForestTypes(db, config.forestTypes);
  return {
    databaseUrl,
    redisUrl: services.redisUrl,
    prefix,
    config,
    db,
    async cleanup() {
      await db.close().catch(() => {});
      const a = new pg.Client({ connectionString: services.databaseUrl });
      await a.connect();
      await a.query(`drop database if exists "${name}" with (force)`).catch(() => {});
      await a.end();
      const redis = new Redis(services.redisUrl, { maxRetriesPerRequest: 1 });
      let cursor = '0';
      do {
        const [next, keys] = await redis.scan(cursor, 'MATCH', `${prefix}:*`, 'COUNT', 1000);
        if (keys.length) await redis.del(...keys);
        cursor = next;
      } while (cursor !== '0');
      await redis.quit();
    },
  };
}

export const testLogger = () => createLogger('warn');
