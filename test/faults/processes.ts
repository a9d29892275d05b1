import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';

// Real `node bin/stemwise.mjs …` processes for the fault tests: their stderr (pino JSON lines and the
// CLI's own lines) is kept so a test can wait for a line and assert on the log. Every process started
// here is registered, so `stopAll()` in afterAll kills whatever a failed test left running, after
// writing each one's stderr to LOG_DIR (to read when a test failed).

export const LOG_DIR = path.join(os.tmpdir(), 'stemwise-fault-logs');

export const BIN = path.resolve(__dirname, '../../bin/stemwise.mjs');

const live = new Set<StemwiseProcess>();
const started: StemwiseProcess[] = [];

export class StemwiseProcess {
  readonly child: ChildProcess;
  stdout = '';
  stderr = '';
  readonly exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  private exitInfo: { code: number | null; signal: NodeJS.Signals | null } | null = null;

  constructor(
    readonly label: string,
    args: readonly string[],
    env: Record<string, string | undefined>,
  ) {
    this.child = spawn(process.execPath, [BIN, ...args], { env: env as NodeJS.ProcessEnv, stdio: ['ignore', 'pipe', 'pipe'] });
    this.child.stdout!.setEncoding('utf8').on('data', (c: string) => (this.stdout += c));
    this.child.stderr!.setEncoding('utf8').on('data', (c: string) => (this.stderr += c));
    live.add(this);
    started.push(this);
    this.exited = new Promise((resolve) => {
      this.child.once('exit', (code, signal) => {
        this.exitInfo = { code, signal };
        live.delete(this);
        resolve(this.exitInfo);
      });
    });
  }

  get running(): boolean {
    return this.exitInfo === null;
  }

  /** Pino JSON lines of stderr, parsed (other lines skipped). */
  logLines(): Array<Record<string, unknown>> {
    const out: Array<Record<string, unknown>> = [];
    for (const line of this.stderr.split('\n')) {
      if (!line.startsWith('{')) continue;
      try {
        out.push(JSON.parse(line) as Record<string, unknown>);
      } catch {
        /* a line cut by the process's end */
      }
    }
    return out;
  }

  /** Waits until stderr matches, failing with the tail of the log after `ms`, or if the process ends first. */
  async waitForStderr(pattern: RegExp, ms: number): Promise<void> {
    const deadline = Date.now() + ms;
    while (!pattern.test(this.stderr)) {
      if (!this.running) throw new Error(`${this.label} exited (${JSON.stringify(this.exitInfo)}) before ${pattern}; stderr:\n${this.stderr.slice(-3000)}`);
      if (Date.now() > deadline) throw new Error(`${this.label}: no ${pattern} within ${ms} ms; stderr:\n${this.stderr.slice(-3000)}`);
      await sleep(50);
    }
  }

  /** Sends a signal and waits for the exit, up to `ms` (then SIGKILL and throw). */
  async stop(signal: NodeJS.Signals = 'SIGTERM', ms = 20_000): Promise<{ code: number | null; signal: NodeJS.Signals | null; ms: number }> {
    const started = Date.now();
    if (!this.running) return { ...this.exitInfo!, ms: 0 };
    this.child.kill(signal);
    const timer = new Promise<'timeout'>((r) => setTimeout(() => r('timeout'), ms).unref());
    const outcome = await Promise.race([this.exited, timer]);
    if (outcome === 'timeout') {
      this.child.kill('SIGKILL');
      await this.exited;
      throw new Error(`${this.label} did not exit within ${ms} ms of ${signal}; stderr:\n${this.stderr.slice(-3000)}`);
    }
    return { ...outcome, ms: Date.now() - started };
  }
}

/** `node bin/stemwise.mjs serve <service>`, resolved once it says it is serving. */
export async function startWorker(service: 'ingest' | 'compute' | 'report' | 'all', env: Record<string, string | undefined>, label: string = service): Promise<StemwiseProcess> {
  const p = new StemwiseProcess(`serve ${label}`, ['serve', service], env);
  await p.waitForStderr(/stemwise: serving /, 60_000);
  return p;
}

/** Runs a stemwise command to its end (bounded), returning exit code and output. */
export async function runStemwise(args: readonly string[], env: Record<string, string | undefined>, ms = 60_000): Promise<{ code: number | null; stdout: string; stderr: string }> {
  const p = new StemwiseProcess(args.join(' '), args, env);
  const timer = new Promise<'timeout'>((r) => setTimeout(() => r('timeout'), ms).unref());
  const outcome = await Promise.race([p.exited, timer]);
  if (outcome === 'timeout') {
    p.child.kill('SIGKILL');
    await p.exited;
    throw new Error(`stemwise ${args.join(' ')} did not end within ${ms} ms; stderr:\n${p.stderr.slice(-3000)}`);
  }
  return { code: outcome.code, stdout: p.stdout, stderr: p.stderr };
}

/** Kills every process these helpers started that is still running (afterAll). */
export async function stopAll(): Promise<void> {
  fs.mkdirSync(LOG_DIR, { recursive: true });
  for (const p of started.splice(0)) fs.writeFileSync(path.join(LOG_DIR, `${p.label.replace(/\W+/g, '-')}-${p.child.pid}.log`), p.stderr);
  await Promise.all(
    [...live].map(async (p) => {
      p.child.kill('SIGKILL');
      await p.exited;
    }),
  );
}

/** A TCP port nobody listens on right now. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

export const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

/** Polls `probe` until it returns a truthy value (errors count as not yet), failing after `ms`. */
export async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, ms: number, every = 100): Promise<T> {
  const deadline = Date.now() + ms;
  let last: unknown = null;
  for (;;) {
    try {
      const v = await probe();
      if (v) return v;
    } catch (err) {
      last = err;
    }
    if (Date.now() > deadline) throw new Error(`${what}: not within ${ms} ms${last ? ` (last error: ${(last as Error).message})` : ''}`);
    await sleep(every);
  }
}
