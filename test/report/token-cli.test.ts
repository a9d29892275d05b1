import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { findAccessTokenByHash, listAuditEntries } from '@stemwise/db';
import { hashToken } from '@stemwise/report';
import { envFor, useServices, type TestServices } from '../support/services';
import { ensureRegion } from './fixture';
import { runCommand, Runtime, tokenCommand } from '@stemwise/cli';

// `stemwise token` as a person runs it (a real process against this file's database), and its other
// subcommands and argument checks through the command module in this process (faster).

const BIN = path.resolve(__dirname, '../../bin/stemwise.mjs');
let s: TestServices;

/** Runs the command module in-process; returns what it printed on stdout, or the error it threw. */
async function inProcess(...args: string[]): Promise<{ stdout: string; error: { code?: string; message: string } | null }> {
  const rt = new Runtime(envFor(s));
  let stdout = '';
  const spy = vi.spyOn(process.stdout, 'write').mockImplementation((chunk: string | Uint8Array) => ((stdout += String(chunk)), true));
  const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
  try {
    await runCommand('token', tokenCommand, args, rt);
    return { stdout, error: null };
  } catch (e) {
    return { stdout, error: e as { code?: string; message: string } };
  } finally {
    spy.mockRestore();
    err.mockRestore();
    await rt.close();
  }
}

function stemwise(...args: string[]) {
  const r = spawnSync(process.execPath, [BIN, 'token', ...args], { env: envFor(s), encoding: 'utf8', timeout: 60_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('stemwise token', () => {
  beforeAll(async () => {
    s = await useServices();
    await ensureRegion(s.db, 'Northvale');
  });
  afterAll(async () => s?.cleanup());

  it('prints a new token once on stdout and stores only its hash, with role and regions', async () => {
    const r = stemwise('create', '--role', 'reader', '--region', 'Northvale', '--region', 'Southmere', '--label', 'district office');
    expect(r.code, r.stderr).toBe(0);
    const token = r.stdout.trim();
    expect(token).toMatch(/^swt_[A-Za-z0-9_-]{43}$/);
    expect(r.stderr).toMatch(/no region named 'Southmere' has been loaded yet/);
    const row = await findAccessTokenByHash(s.db, hashToken(token));
    expect(row).toMatchObject({ role: 'reader', regions: ['Northvale', 'Southmere'], label: 'district office', revokedAt: null });
    const stored = await s.db.query<{ token_hash: string }>(`select token_hash from access_tokens`);
    expect(JSON.stringify(stored)).not.toContain(token);
    expect((await listAuditEntries(s.db, { action: 'token.create' })).map((e) => e.target)).toContain(row!.id);

    const list = await inProcess('list');
    expect(list.stdout).toContain(`${row!.id}\treader\tNorthvale,Southmere\tdistrict office\t`);
    expect(list.stdout).not.toContain(token);

    expect((await inProcess('revoke', row!.id)).error).toBeNull();
    expect((await findAccessTokenByHash(s.db, hashToken(token)))!.revokedAt).not.toBeNull();
    expect((await inProcess('revoke', row!.id)).error).toMatchObject({ code: 'not_found' }); // already revoked
  });

  it('refuses bad arguments with exit code 2 and a clear line', async () => {
    const r = stemwise('create', '--role', 'owner');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--role must be one of admin, uploader, reader/);
    expect(r.stdout).toBe('');
    const cases: Array<[string[], RegExp]> = [
      [['create', '--role', 'owner'], /--role must be one of admin, uploader, reader/],
      [['create', '--role', 'reader'], /a reader token needs at least one --region/],
      [['create', '--role', 'admin', '--region', 'Northvale'], /--region is for reader tokens only/],
      [['create', '--role', 'admin', '--colour', 'red'], /Unknown option '--colour'/],
      [['revoke', 'abc'], /token revoke takes one token id/],
      [[], /token needs create, list or revoke/],
    ];
    for (const [args, message] of cases) {
      const out = await inProcess(...args);
      expect(out.error, args.join(' ')).toMatchObject({ code: 'usage' });
      expect(out.error!.message).toMatch(message);
      expect(out.stdout).toBe('');
    }
  });
});
