import { spawn } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { describeLeaks, findLeaks, snapshotResources, type ResourceCounts } from '../support/open-handles';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '../..');

/** What the process holds once vitest's own short timers inside a running test are gone (per-kind minimum over 300 ms). */
async function settledSnapshot(): Promise<ResourceCounts> {
  const min = snapshotResources();
  for (let i = 0; i < 15; i++) {
    await new Promise((r) => setTimeout(r, 20));
    const now = snapshotResources();
    for (const [kind, n] of min) min.set(kind, Math.min(n, now.get(kind) ?? 0));
  }
  return min;
}

describe('open-handle check', () => {
  test('reports a socket, a server, an interval and a child process left open, and nothing once they close', async () => {
    const baseline = await settledSnapshot();
    const server = net.createServer((s) => s.on('error', () => {}));
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
    const client = net.connect((server.address() as net.AddressInfo).port, '127.0.0.1');
    await new Promise((r) => client.once('connect', r));
    const interval = setInterval(() => {}, 1000);
    const child = spawn(process.execPath, ['-e', 'setTimeout(() => {}, 60000)'], { stdio: 'ignore' });
    const exited = new Promise((r) => child.once('exit', r));
    try {
      const leaks = await findLeaks(baseline, 100);
      const kinds = leaks.map((l) => l.kind);
      expect(kinds).toEqual(expect.arrayContaining(['TCPServerWrap', 'TCPSocketWrap', 'Timeout', 'ProcessWrap']));
      // client and accepted server-side socket: two sockets
      expect(leaks.find((l) => l.kind === 'TCPSocketWrap')?.extra).toBe(2);
      expect(describeLeaks(leaks)).toMatch(/1 × Timeout/);
    } finally {
      clearInterval(interval);
      client.destroy();
      await new Promise((r) => server.close(r));
      child.kill();
      await exited;
    }
    expect(await findLeaks(baseline)).toEqual([]);
  });

  test('runs after the file’s own afterAll hooks and fails only the file that leaks', async () => {
    const out = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-leaks-')), 'result.json');
    const env = Object.fromEntries(Object.entries(process.env).filter(([k]) => !k.startsWith('VITEST') && k !== 'NODE_OPTIONS'));
    const child = spawn(
      process.execPath,
      [path.join(root, 'node_modules/vitest/vitest.mjs'), 'run', '--config', path.join(here, 'leak-fixtures/vitest.config.ts'), '--reporter=json', `--outputFile=${out}`],
      { cwd: root, env, stdio: 'ignore' },
    );
    const code = await new Promise((r) => child.once('exit', r));
    const report = JSON.parse(fs.readFileSync(out, 'utf8')) as { testResults: Array<{ name: string; status: string; message: string }> };
    fs.rmSync(path.dirname(out), { recursive: true, force: true });
    const byFile = Object.fromEntries(report.testResults.map((r) => [path.basename(r.name), r]));
    expect(code).toBe(1);
    expect(byFile['closes-in-after-all.fixture.ts'].status).toBe('passed');
    expect(byFile['leaves-open.fixture.ts'].status).toBe('failed');
    expect(byFile['leaves-open.fixture.ts'].message).toMatch(/left resources open.*TCPServerWrap.*TCPSocketWrap.*Timeout/);
  });
});
