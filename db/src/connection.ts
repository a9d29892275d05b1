import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { PGlite } from '@electric-sql/pglite';
import { drizzle as drizzlePglite } from 'drizzle-orm/pglite';
import { migrate as migratePglite } from 'drizzle-orm/pglite/migrator';
import { drizzle as drizzlePg } from 'drizzle-orm/node-postgres';
import { migrate as migratePg } from 'drizzle-orm/node-postgres/migrator';
import type { PgDatabase, PgQueryResultHKT } from 'drizzle-orm/pg-core';
import pg from 'pg';
import { ServiceUnavailableError, oneLine, type Config } from '@stemwise/platform';
import { MIGRATE_LOCK } from './advisory-locks';
import * as schema from './schema/index';

export const MIGRATIONS_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../migrations');

/** Anything that runs parameterised SQL: the database itself or an open transaction. */
export interface Queryable {
  query<T = Record<string, unknown>>(text: string, params?: readonly unknown[]): Promise<T[]>;
}

export type CopyChunks = AsyncIterable<string | Uint8Array> | Iterable<string | Uint8Array>;

/** A transaction: parameterised SQL plus bulk COPY where the engine allows streaming it. */
export interface Tx extends Queryable {
  readonly kind: Db['kind'];
  /** COPY … FROM STDIN on PostgreSQL: writes the chunks the iterator yields (text, or text already encoded as UTF-8). */
  copyFrom(copySql: string, chunks: CopyChunks): Promise<void>;
}

export interface Db extends Queryable {
  readonly kind: 'postgres' | 'pglite';
  /** drizzle, for typed queries where they read better than SQL. */
  readonly orm: PgDatabase<PgQueryResultHKT, typeof schema>;
  /** Runs `fn` in one transaction: all of it commits, or none of it. */
  transaction<T>(fn: (tx: Tx) => Promise<T>): Promise<T>;
  /** A session-level advisory lock held while `fn` runs (PGlite: one connection, a no-op). */
  withLock<T>(key: number, fn: () => Promise<T>): Promise<T>;
  close(): Promise<void>;
}

/** The one connection factory: PostgreSQL through `pg` when DATABASE_URL is set, else PGlite in the data folder. */
export async function openDatabase(config: Pick<Config, 'databaseUrl' | 'dataDir'>, options: { poolSize?: number } = {}): Promise<Db> {
  return config.databaseUrl ? openPostgres(config.databaseUrl, options.poolSize ?? 10) : openPglite(path.join(config.dataDir, 'pgdata'));
}

function describeUrl(url: string): string {
  try {
    const u = new URL(url);
    return `${u.hostname}:${u.port || 5432}${u.pathname}`;
  } catch {
    return 'the configured server';
  }
}

async function openPostgres(url: string, poolSize: number): Promise<Db> {
  const pool = new pg.Pool({ connectionString: url, max: poolSize, connectionTimeoutMillis: 5000 });
  pool.on('error', () => {}); // idle clients dropped by a server restart are replaced on next use
  // A checked-out client whose connection the server cuts (a restart, say) between two queries emits
  // 'error' too; without a listener that would end the process. Its next query fails instead (the job
  // is retried) and the pool discards it on release.
  pool.on('connect', (client) => client.on('error', () => {}));
  try {
    await pool.query('select 1');
  } catch (err) {
    await pool.end().catch(() => {});
    throw new ServiceUnavailableError('DATABASE_URL', `cannot reach PostgreSQL at ${describeUrl(url)} (${oneLine(err)})`, { cause: err });
  }
  const orm = drizzlePg(pool, { schema }) as unknown as Db['orm'];
  const query = async <T>(text: string, params?: readonly unknown[]) => (await pool.query(text, params as unknown[])).rows as T[];
  return {
    kind: 'postgres',
    orm,
    query,
    async transaction(fn) {
      const client = await pool.connect();
      try {
        await client.query('begin');
        const tx: Tx = {
          kind: 'postgres',
          query: async (text, params) => (await client.query(text, params as unknown[])).rows,
          copyFrom: (copySql, chunks) => copyIntoPostgres(client, copySql, chunks),
        };
        const result = await fn(tx);
        await client.query('commit');
        return result;
      } catch (err) {
        await client.query('rollback').catch(() => {});
        throw err;
      } finally {
        client.release();
      }
    },
    async withLock(key, fn) {
      const client = await pool.connect();
      try {
        await client.query('select pg_advisory_lock($1)', [key]);
        try {
          return await fn();
        } finally {
          await client.query('select pg_advisory_unlock($1)', [key]).catch(() => {});
        }
      } finally {
        client.release();
      }
    },
    close: () => pool.end(),
  };
}

async function copyIntoPostgres(client: pg.PoolClient, copySql: string, chunks: CopyChunks): Promise<void> {
  const { from } = await import('pg-copy-streams');
  const { pipeline } = await import('node:stream/promises');
  const { Readable } = await import('node:stream');
  const stream = client.query(from(copySql));
  await pipeline(Readable.from(chunks), stream);
}

async function openPglite(dir: string): Promise<Db> {
  fs.mkdirSync(dir, { recursive: true });
  let client: PGlite;
  try {
    client = await PGlite.create(dir);
  } catch (err) {
    throw new ServiceUnavailableError('STEMWISE_DATA_DIR', `cannot open the embedded database in ${dir} (${oneLine(err)})`, { cause: err });
  }
  const orm = drizzlePglite(client, { schema }) as unknown as Db['orm'];
  const query = async <T>(text: string, params?: readonly unknown[]) => (await client.query<T>(text, params as unknown[])).rows;
  return {
    kind: 'pglite',
    orm,
    query,
    transaction: (fn) =>
      client.transaction(async (t) =>
        fn({
          kind: 'pglite',
          query: async (text, params) => (await t.query(text, params as unknown[])).rows as never[],
          copyFrom: async (copySql, chunks) => {
            const parts: Array<string | Uint8Array> = [];
            for await (const c of chunks) parts.push(c);
            await t.query(copySql.replace(/from\s+stdin/i, "FROM '/dev/blob'"), [], { blob: new Blob(parts) });
          },
        }),
      ),
    withLock: (_key, fn) => fn(),
    close: () => client.close(),
  };
}

/** Creates or upgrades the schema (idempotent; concurrent callers on PostgreSQL wait for each other). */
export async function migrateDatabase(db: Db): Promise<void> {
  await db.withLock(MIGRATE_LOCK, async () => {
    if (db.kind === 'postgres') await migratePg(db.orm as never, { migrationsFolder: MIGRATIONS_DIR });
    else await migratePglite(db.orm as never, { migrationsFolder: MIGRATIONS_DIR });
  });
}
