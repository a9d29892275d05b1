import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import type { TestProject } from 'vitest/node';
import { MIGRATIONS_DIR } from '@stemwise/db';
import { resolveServices, type ServiceUrls } from './resolve';

declare module 'vitest' {
  export interface ProvidedContext {
    services: ServiceUrls | { error: string };
    templateDb: string;
  }
}

/**
 * Finds PostgreSQL and Redis once per run (environment, else local defaults, else testcontainers) and
 * prepares a migrated template database that every test file clones into a database of its own.
 * Unit tests never touch either; an integration test gets a clear message when they are missing.
 */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  let stop = async () => {};
  try {
    const found = await resolveServices();
    stop = found.stop;
    const template = await prepareTemplate(found.urls.databaseUrl);
    project.provide('services', found.urls);
    project.provide('templateDb', template);
  } catch (err) {
    project.provide('services', { error: err instanceof Error ? err.message : String(err) });
    project.provide('templateDb', '');
  }
  return stop;
}

function migrationsHash(): string {
  const h = crypto.createHash('sha256');
  const walk = (dir: string) => {
    for (const f of fs.readdirSync(dir).sort()) {
      const p = path.join(dir, f);
      if (fs.statSync(p).isDirectory()) walk(p);
      else h.update(f).update(fs.readFileSync(p));
    }
  };
  walk(MIGRATIONS_DIR);
  return h.digest('hex').slice(0, 12);
}

async function prepareTemplate(adminUrl: string): Promise<string> {
  const name = `stemwise_tpl_${migrationsHash()}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  try {
    const exists = await admin.query('select 1 from pg_database where datname = $1', [name]);
    if (exists.rowCount) return name;
    const building = `${name}_${process.pid}`;
    await admin.query(`create database "${building}"`);
    const url = new URL(adminUrl);
    url.pathname = `/${building}`;
    const { openDatabase, migrateDatabase } = await import('../../db/src/connection');
    const db = await openDatabase({ databaseUrl: url.toString(), dataDir: '' }, { poolSize: 2 });
    await migrateDatabase(db);
    await db.close();
    try {
      await admin.query(`alter database "${building}" rename to "${name}"`);
    } catch {
      await admin.query(`drop database if exists "${building}"`); // another run built it first
    }
    return name;
  } finally {
    await admin.end();
  }
}
