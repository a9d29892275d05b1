import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { SpeciesIndex } from '@stemwise/core/science';
import type { ChunkTask, VisitOutcome } from './chunk-metrics';
import type { MetricsReply, MetricsRequest } from './metrics-worker';

// Worker threads for the CPU-bound part of the plot chunks (chunk-metrics.ts), shared by every chunk
// job of the process (STEMWISE_COMPUTE_THREADS of them; none by default). Measured with the compute bench
// (--in-process, 1M stems, PostgreSQL on the same 2-core machine): two chunk jobs at once without threads
// keep both cores busy (PostgreSQL reads one chunk while this process computes the other) and were
// fastest; threads added the cost of copying every stem to them and back on the main thread and were
// slower (see README "Speed and memory"). They are for machines with cores to spare. A chunk is
// cut into contiguous slices, one per thread, and the outcomes are put back in the chunk's order, so
// the results are those of the job's own thread, value for value. Memory stays bounded: a thread holds
// one slice at a time, and the species reference once. A thread runs only while it has work: it is
// ended after IDLE_MS without any, and never keeps the process alive while idle.

/** How long an idle thread is kept for the next slice (the chunks of a run come one after another). */
const IDLE_MS = 1000;
/** Fewer visits than this are not worth a slice of their own. */
const MIN_SLICE = 50;

/** Set by the build's banner (scripts/build.ts) to the URL of the compiled file; undefined when running the sources. */
declare const __stemwiseBuildUrl: string | undefined;

/** The file of tsx's `tsx/esm/api` for `import` (require.resolve gives its CommonJS twin, which cannot register the hooks from a worker). */
function tsxEsmApi(): string {
  const require = createRequire(import.meta.url);
  const manifest = require.resolve('tsx/package.json');
  const exported = (JSON.parse(fs.readFileSync(manifest, 'utf8')) as { exports: Record<string, { import: { default: string } }> }).exports['./esm/api'];
  return path.join(path.dirname(manifest), exported.import.default);
}

function startWorker(): Worker {
  if (typeof __stemwiseBuildUrl === 'string') return new Worker(new URL('./metrics-worker.mjs', __stemwiseBuildUrl));
  // From the TypeScript sources (tsx, tests): the worker loads them through tsx as bin/stemwise.mjs does.
  const tsx = pathToFileURL(tsxEsmApi()).href;
  const entry = new URL('./metrics-worker.ts', import.meta.url).href;
  return new Worker(`import(${JSON.stringify(tsx)}).then((m) => { (m.register ?? m.default.register)(); return import(${JSON.stringify(entry)}); })`, { eval: true });
}

interface Job {
  request: MetricsRequest;
  species: SpeciesIndex;
  resolve(outcomes: VisitOutcome[]): void;
  reject(err: Error): void;
}

interface Thread {
  worker: Worker;
  job: Job | null;
  /** Ids of the species references this thread has been sent. */
  species: Set<number>;
  idle: NodeJS.Timeout | null;
}

export class MetricsPool {
  private readonly threads = new Set<Thread>();
  private readonly waiting: Job[] = [];
  private readonly speciesIds = new WeakMap<SpeciesIndex, number>();
  private nextSpeciesId = 1;
  private nextId = 1;
  /** close() was called: each thread ends as soon as it has no slice to do, instead of idling. */
  private closing = false;
  /** Threads started over the pool's life (one per thread until it idles out). */
  started = 0;

  constructor(readonly size: number) {}

  /** The outcome of every visit of the task, in the order of its visits (as computeVisits returns them). */
  async compute(task: ChunkTask): Promise<VisitOutcome[]> {
    const { species, ...rest } = task;
    const n = rest.visits.length;
    const slices = Math.max(1, Math.min(this.size, Math.floor(n / MIN_SLICE)));
    const parts: Array<Promise<VisitOutcome[]>> = [];
    for (let k = 0; k < slices; k++) {
      const [from, to] = [Math.floor((n * k) / slices), Math.floor((n * (k + 1)) / slices)];
      const slice = { ...rest, visits: rest.visits.slice(from, to), stems: rest.stems.slice(from, to) };
      parts.push(new Promise((resolve, reject) => this.dispatch({ request: { id: this.nextId++, speciesId: this.speciesId(species), task: slice }, species, resolve, reject })));
    }
    return (await Promise.all(parts)).flat();
  }

  /**
   * Ends every thread once it has no slice to do: idle threads now, busy ones after their slice (a job
   * still running while its worker stops, within the grace time, gets its outcomes). Resolves when all have ended.
   */
  async close(): Promise<void> {
    this.closing = true;
    for (const t of [...this.threads]) if (!t.job) await this.end(t, null);
    while (this.threads.size) await new Promise((r) => setTimeout(r, 20));
  }

  private speciesId(index: SpeciesIndex): number {
    let id = this.speciesIds.get(index);
    if (id === undefined) this.speciesIds.set(index, (id = this.nextSpeciesId++));
    return id;
  }

  private dispatch(job: Job): void {
    const free = [...this.threads].find((t) => !t.job) ?? (this.threads.size < this.size ? this.spawn() : null);
    if (free) this.run(free, job);
    else this.waiting.push(job);
  }

  private spawn(): Thread {
    const thread: Thread = { worker: startWorker(), job: null, species: new Set(), idle: null };
    this.started++;
    thread.worker.on('message', (reply: MetricsReply) => {
      const job = thread.job;
      if (!job || job.request.id !== reply.id) return;
      thread.job = null;
      if ('error' in reply) job.reject(new Error(`metrics worker: ${reply.error}`));
      else job.resolve(reply.outcomes);
      this.next(thread);
    });
    // A thread that fails or exits on its own takes its slice with it: that chunk job fails (and is retried).
    thread.worker.on('error', (err) => void this.end(thread, err));
    thread.worker.on('exit', (code) => void this.end(thread, new Error(`metrics worker exited with code ${code}`)));
    this.threads.add(thread);
    return thread;
  }

  private run(thread: Thread, job: Job): void {
    if (thread.idle) clearTimeout(thread.idle);
    thread.idle = null;
    thread.job = job;
    const request = thread.species.has(job.request.speciesId) ? job.request : { ...job.request, speciesRows: job.species.species };
    thread.species.add(job.request.speciesId);
    thread.worker.ref(); // a slice in flight keeps the process alive until its outcome is back
    thread.worker.postMessage(request);
  }

  private next(thread: Thread): void {
    const job = this.waiting.shift();
    if (job) return this.run(thread, job);
    if (this.closing) return void this.end(thread, null);
    thread.worker.unref();
    thread.idle = setTimeout(() => void this.end(thread, null), IDLE_MS).unref();
  }

  private async end(thread: Thread, err: Error | null): Promise<void> {
    if (!this.threads.delete(thread)) return;
    if (thread.idle) clearTimeout(thread.idle);
    thread.job?.reject(err ?? new Error('metrics pool: thread ended'));
    thread.job = null;
    await thread.worker.terminate();
    // Slices waiting for a thread get a new one.
    const job = this.waiting.shift();
    if (job) this.dispatch(job);
  }
}

let shared: MetricsPool | null = null;

/** The process's pool of `size` threads (a new one if the size changed). */
export function metricsPool(size: number): MetricsPool {
  if (shared?.size !== size) {
    void shared?.close();
    shared = new MetricsPool(size);
  }
  return shared;
}

/** Ends the process's pool (a compute worker stopping). */
export async function closeMetricsPool(): Promise<void> {
  const pool = shared;
  shared = null;
  await pool?.close();
}
