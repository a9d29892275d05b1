import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { main, type CliIo } from './cli';

function fakeIo(isTTY: boolean): CliIo & { out: string; err: string } {
  const io = {
    out: '',
    err: '',
    stdout: { write: (t: string) => { io.out += t; return true; } },
    stderr: { isTTY, write: (t: string) => { io.err += t; return true; } },
  };
  return io;
}

let dir: string;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'demo-inventory-cli-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('demo-inventory command', () => {
  it('writes the files and prints where, with plain progress lines when not on a terminal', async () => {
    const io = fakeIo(false);
    const code = await main(['--plots', '12', '--seed', '3', '--out', join(dir, 'a'), '--heights', '0.5', '--bad-rows', '4'], io);
    expect(code).toBe(0);
    expect((await readdir(join(dir, 'a'))).sort()).toEqual(['plots.csv', 'second-visit', 'species.csv', 'strata.csv', 'trees.csv', 'truth.json']);
    expect(io.out).toMatch(/^wrote 12 plots and \d+ stems in [\d.]+ s, with 4 deliberately bad rows/);
    expect(io.err).not.toContain('\r');
    expect(io.err.trim().split('\n').at(-1)).toMatch(/^100% 12\/12 plots/);
  });

  it('draws a progress bar on a terminal and writes gzip files with --gzip', async () => {
    const io = fakeIo(true);
    expect(await main(['--plots', '6', '--out', join(dir, 'b'), '--gzip'], io)).toBe(0);
    expect(io.err).toMatch(/\r\[#+\] 100% 6\/6 plots/);
    expect(io.err.endsWith('\n')).toBe(true);
    expect((await readdir(join(dir, 'b'))).sort()).toEqual(['plots.csv.gz', 'second-visit', 'species.csv.gz', 'strata.csv.gz', 'trees.csv.gz', 'truth.json']);
  });

  it('prints help with --help and exits 0', async () => {
    const io = fakeIo(false);
    expect(await main(['--help'], io)).toBe(0);
    expect(io.out).toContain('--bad-rows N');
  });

  it('exits 2 with a message naming the problem on bad usage', async () => {
    const cases: [string[], RegExp][] = [
      [[], /--out DIR is required/],
      [['--out', dir, '--plots', 'many'], /--plots must be a number/],
      [['--out', dir, '--plots', '2.5'], /--plots must be a whole number/],
      [['--out', dir, '--heights', '2'], /--heights must be a number from 0 to 1/],
      [['--out', dir, '--colour'], /colour/],
      [['--out', dir, 'extra'], /unexpected argument 'extra'/],
    ];
    for (const [argv, message] of cases) {
      const io = fakeIo(false);
      expect(await main(argv, io)).toBe(2);
      expect(io.err).toMatch(message);
      expect(io.err).toContain('usage: demo-inventory');
    }
  });
});
