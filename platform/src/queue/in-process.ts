import type { Logger } from '../logger';
import { oneLine } from '../errors';
import { assertProcessors } from './check';
import { queueOf, QUEUE_NAMES, type JobName, type QueueName } from './jobs';
import type { JobQueue, JobSpec, JobState, ProcessorMap, QueueCounts, ScheduleInfo, StopResult, WorkOptions } from './types';

interface Pending {
  spec: JobSpec;
  /** Ids of children that must complete first. */
  after: string[];
}

/**
 * Runs jobs by calling the same processors directly, in the order they were added (a flow's children
 * before their parent, which starts once they have all finished). For the single-machine demo and the
 * CLI without Redis: nothing survives the process, and there are no retries. One job at a time, except
 * that jobs of one queue run up to that queue's `concurrency` (work options) at once, as a worker with
 * that concurrency would: the plot chunks of a run, so that PostgreSQL reads one chunk while this
 * process computes another. Jobs of another queue wait until the running ones are done.
 */
export class InProcessQueue implements JobQueue {
  readonly kind = 'in-process' as const;
  private processors: ProcessorMap = {};
  private readonly pending: Pending[] = [];
  private readonly states = new Map<string, JobState>();
  private readonly failures: Array<{ jobId: string; name: JobName; error: string }> = [];
  private running: Promise<void> | null = null;
  private serving = false;
  private readonly served = new Set<QueueName>();
  private readonly concurrency: Partial<Record<QueueName, number>> = {};
  private reported = 0;

  constructor(private readonly log: Logger) {}

  async add(spec: JobSpec): Promise<void> {
    this.enqueue(spec);
    // Once a process serves jobs (`work` was called), what is added runs in the background, as a worker would.
    if (this.serving) void this.kick();
  }

  private enqueue(spec: JobSpec): void {
    if (this.states.has(spec.jobId)) return;
    const after: string[] = [];
    for (const child of spec.children ?? []) {
      this.enqueue(child);
      after.push(child.jobId);
    }
    this.states.set(spec.jobId, after.length ? 'waiting-children' : 'waiting');
    this.pending.push({ spec, after });
  }

  async work(processors: ProcessorMap, options: WorkOptions): Promise<void> {
    assertProcessors(processors, options.queues);
    this.processors = { ...this.processors, ...processors };
    for (const q of options.queues) this.served.add(q);
    Object.assign(this.concurrency, options.concurrency);
    this.serving = true;
  }

  async workerCount(queue: QueueName): Promise<number> {
    return this.served.has(queue) ? 1 : 0;
  }

  async drain(): Promise<ReadonlyArray<{ jobId: string; name: JobName; error: string }>> {
    while (this.pending.length || this.running) await this.kick();
    // Failures not yet reported by an earlier drain (background runs report here too).
    const fresh = this.failures.slice(this.reported);
    this.reported = this.failures.length;
    return fresh;
  }

  private kick(): Promise<void> {
    this.running ??= this.runAll().finally(() => (this.running = null));
    return this.running;
  }

  private async runAll(): Promise<void> {
    const active = new Map<Promise<void>, QueueName>();
    while (this.pending.length || active.size) {
      for (let i = 0; i < this.pending.length; ) {
        const next = this.pending[i];
        const queue = queueOf(next.spec.name);
        const [busy] = active.values();
        if (busy !== undefined && (busy !== queue || active.size >= Math.max(1, this.concurrency[queue] ?? 1))) break;
        // A parent waits for children still running; any other job waits for nothing but its turn.
        if (next.after.some((id) => this.unfinished(id))) {
          if (!active.size) throw new Error(`in-process queue: ${next.spec.jobId} waits for children that never ran`);
          i++;
          continue;
        }
        this.pending.splice(i, 1);
        const run: Promise<void> = this.runOne(next).finally(() => active.delete(run));
        active.set(run, queue);
      }
      if (active.size) await Promise.race(active.keys());
    }
  }

  private unfinished(jobId: string): boolean {
    const state = this.states.get(jobId);
    return state === 'waiting' || state === 'waiting-children' || state === 'active';
  }

  private async runOne({ spec, after }: Pending): Promise<void> {
    const { jobId, name } = spec;
    const blocked = after.find((id) => this.states.get(id) !== 'completed');
    if (blocked) {
      this.fail(jobId, name, `a child job failed (${blocked})`);
      return;
    }
    const processor = this.processors[name];
    if (!processor) {
      this.fail(jobId, name, `no processor for ${name} in this process`);
      return;
    }
    this.states.set(jobId, 'active');
    const log = this.log.child({ queue: queueOf(name), jobId, jobName: name });
    try {
      await processor(spec.data, { jobId, name, attempt: 1, maxAttempts: 1, log, queue: this, progress: async () => {} });
      this.states.set(jobId, 'completed');
    } catch (err) {
      log.error({ err }, 'job failed');
      this.fail(jobId, name, oneLine(err));
    }
  }

  private fail(jobId: string, name: JobName, error: string): void {
    this.states.set(jobId, 'failed');
    this.failures.push({ jobId, name, error });
  }

  async state(jobId: string): Promise<JobState> {
    return this.states.get(jobId) ?? 'unknown';
  }

  async failedReason(jobId: string): Promise<string | null> {
    return this.failures.findLast((f) => f.jobId === jobId)?.error ?? null;
  }

  async counts(): Promise<Record<QueueName, QueueCounts>> {
    const out = Object.fromEntries(
      QUEUE_NAMES.map((q) => [q, { waiting: 0, active: 0, delayed: 0, completed: 0, failed: 0 }]),
    ) as Record<QueueName, QueueCounts>;
    for (const p of this.pending) out[queueOf(p.spec.name)].waiting++;
    return out;
  }

  async schedule(): Promise<void> {
    throw new Error('schedules need Redis (REDIS_URL): the in-process runner has no clock of its own');
  }

  async schedules(): Promise<ScheduleInfo[]> {
    return [];
  }

  /** Nothing here survives the process: queued jobs are dropped, the running one may finish within `graceMs`. */
  async stop(graceMs: number): Promise<StopResult> {
    this.pending.length = 0;
    if (this.running) await Promise.race([this.running, new Promise((r) => setTimeout(r, graceMs).unref())]);
    return { handedBack: [] };
  }

  async close(): Promise<void> {
    this.pending.length = 0;
  }
}
