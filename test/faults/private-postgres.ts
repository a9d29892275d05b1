import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import pg from 'pg';
import { freePort } from './processes';

// A PostgreSQL cluster of one test's own (initdb in a temp folder, a free port), so the test may
// restart it; the shared server on 5432 serves every other test file and is never restarted. As
// root the server binaries run as the `postgres` OS user, which owns the temp folder.

const exec = promisify(execFile);

export interface PrivatePostgres {
  /** URL of the `stemwise` database of this cluster. */
  url: string;
  /** `pg_ctl restart -m fast`: every connection is cut, the server is back when it returns. */
  restart(): Promise<{ ms: number }>;
  stop(): Promise<void>;
}

/** The folder of initdb/pg_ctl, newest major version first; a clear error when there is none. */
export function postgresBinaries(): string {
  const root = '/usr/lib/postgresql';
  const versions = fs.existsSync(root) ? fs.readdirSync(root).filter((v) => fs.existsSync(path.join(root, v, 'bin', 'pg_ctl'))) : [];
  versions.sort((a, b) => Number(b) - Number(a));
  if (!versions.length) {
    throw new Error(`the PostgreSQL-restart fault test needs the server binaries (initdb, pg_ctl) in ${root}/<version>/bin; none found (install the postgresql server package)`);
  }
  return path.join(root, versions[0], 'bin');
}

export async function startPrivatePostgres(): Promise<PrivatePostgres> {
  const bin = postgresBinaries();
  const asRoot = process.getuid?.() === 0;
  const run = (tool: string, args: string[]) =>
    asRoot ? exec('runuser', ['-u', 'postgres', '--', path.join(bin, tool), ...args], { timeout: 60_000 }) : exec(path.join(bin, tool), args, { timeout: 60_000 });
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-pg-'));
  if (asRoot) {
    const { stdout } = await exec('id', ['-u', 'postgres']);
    const { stdout: gid } = await exec('id', ['-g', 'postgres']);
    fs.chownSync(dir, Number(stdout.trim()), Number(gid.trim()));
  }
  const data = path.join(dir, 'data');
  const port = await freePort();
  await run('initdb', ['-D', data, '-A', 'trust', '-U', 'postgres', '-E', 'UTF8', '--no-sync', '--no-instructions']);
  const options = `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c synchronous_commit=off -c full_page_writes=off -c max_connections=60`;
  await run('pg_ctl', ['-D', data, '-l', path.join(dir, 'server.log'), '-w', '-t', '30', '-o', options, 'start']);
  const admin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${port}/postgres` });
  await admin.connect();
  await admin.query('create database stemwise');
  await admin.end();
  return {
    url: `postgres://postgres@127.0.0.1:${port}/stemwise`,
    async restart() {
      const started = Date.now();
      await run('pg_ctl', ['-D', data, '-l', path.join(dir, 'server.log'), '-w', '-t', '30', '-m', 'fast', 'restart']);
      return { ms: Date.now() - started };
    },
    async stop() {
      await run('pg_ctl', ['-D', data, '-m', 'immediate', '-w', 'stop']).catch(() => {});
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
