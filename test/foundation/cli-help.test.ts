import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';
import { COMMAND_NAMES, loadCommand } from '@stemwise/cli';
import { runMain } from '../support/cli';

// Every command and subcommand answers --help without acting, and refuses an unknown option with one
// line and exit code 2. The environment points at services that do not exist: a command that tried to
// open the database or the queue would fail (exit 1) instead of printing its usage.

const BIN = path.resolve(__dirname, '../../bin/stemwise.mjs');
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-help-'));
const env = {
  ...process.env,
  DATABASE_URL: 'postgres://postgres@127.0.0.1:1/nowhere',
  REDIS_URL: 'redis://127.0.0.1:1',
  STEMWISE_DATA_DIR: dataDir,
  STEMWISE_PORT: '1',
};
afterAll(() => fs.rmSync(dataDir, { recursive: true, force: true }));

const inProcess = (args: string[]) => runMain(args, env);

/** Every command, and every subcommand as `command sub`. */
async function allCommands(): Promise<string[][]> {
  const all: string[][] = [];
  for (const name of COMMAND_NAMES) {
    const command = (await loadCommand(name))!;
    all.push([name]);
    if ('subcommands' in command) for (const sub of Object.keys(command.subcommands)) all.push([name, sub]);
  }
  return all;
}

describe('stemwise <command> --help', () => {
  it('walks every command and subcommand: usage on stdout, exit 0, nothing opened or written', async () => {
    const walked = await allCommands();
    expect(walked.map((c) => c.join(' '))).toEqual(
      expect.arrayContaining(['migrate', 'species import', 'upload', 'batch show', 'recompute', 'export', 'serve', 'token create', 'token list', 'token revoke', 'demo']),
    );
    const extra: Record<string, string[]> = { export: ['plots'], serve: ['ingest'] };
    for (const cmd of walked) {
      for (const flag of ['--help', '-h']) {
        const args = [...cmd, ...(extra[cmd.join(' ')] ?? []), flag];
        const r = await inProcess(args);
        expect(r.code, `${args.join(' ')}: ${r.stderr}`).toBe(0);
        expect(r.stdout, args.join(' ')).toMatch(new RegExp(`^usage:[^]*stemwise ${cmd.join(' ')}`));
        expect(r.stderr, args.join(' ')).toBe('');
      }
    }
    expect(fs.readdirSync(dataDir)).toEqual([]); // no embedded database, no demo folder, no uploads
  });

  it('refuses an unknown option of every command and subcommand with one line and exit code 2', async () => {
    for (const cmd of await allCommands()) {
      const r = await inProcess([...cmd, '--no-such-option']);
      expect(r.code, cmd.join(' ')).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr.trimEnd().split('\n'), r.stderr).toHaveLength(1);
      expect(r.stderr).toMatch(/^stemwise: .*--no-such-option/);
    }
  });

  it('as a real process: migrate --help does not migrate, serve --help does not serve', async () => {
    const run = promisify(execFile);
    for (const args of [['migrate', '--help'], ['serve', 'all', '--help']]) {
      const r = await run(process.execPath, [BIN, ...args], { env, timeout: 30_000 });
      expect(r.stdout).toMatch(new RegExp(`^usage: stemwise ${args[0]}`));
      expect(r.stderr).toBe('');
    }
    expect(fs.readdirSync(dataDir)).toEqual([]);
  });
});
