import { FlowProducer, Job, Queue, UnrecoverableError, Worker, type FlowJob, type JobsOptions } from 'bullmq';
import { Redis } from 'ioredis';
import type { Logger } from '../logger';
import { PermanentError, ServiceUnavailableError, oneLine } from '../errors';
import { assertProcessors } from './check';
import { QUEUE_NAMES, queueOf, type JobName, type QueueName } from './jobs';
import type { JobQueue, JobSpec, JobState, ProcessorMap, QueueCounts, ScheduleInfo, StopResult, WorkOptions } from './types';

export interface BullOptions {
  url: string;
  prefix: string;
  attempts: number;
  log: Logger;
  /** How long a worker's hold on a job lasts without renewal, and how often stalled jobs are looked for (ms). */
  lockMs?: number;
}

/** Opens a Redis connection and checks it answers; an unreachable Redis is one clear line naming REDIS_URL. */
export async function connectRedis(url: string, timeoutMs = 4000): Promise<Redis> {
  // disconnectTimeout: after a refused connection ioredis's disconnect() still arms this timer (its socket
  // closed before it listened), which would hold the process open for the default 2 s.
  const redis = new Redis(url, { maxRetriesPerRequest: null, lazyConnect: true, connectTimeout: timeoutMs, enableOfflineQueue: true, disconnectTimeout: 500 });
  redis.on('error', () => {}); // reported through the ping below and by the workers' own listeners
  let timer: NodeJS.Timeout | undefined;
  try {
    await Promise.race([
      redis.connect().then(() => redis.ping()),
      new Promise((_, reject) => (timer = setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs))),
    ]);
  } catch (err) {
    redis.disconnect();
    throw new ServiceUnavailableError('REDIS_URL', `cannot reach Redis at ${redactUrl(url)} (${oneLine(err)})`, { cause: err });
  } finally {
    clearTimeout(timer); // else it holds the process open for timeoutMs after every connection
  }
  return redis;
}

export function redactUrl(url: string): string {
  return url.replace(/\/\/([^:@/]*):([^@/]*)@/, '//$1:***@');
}

/** BullMQ on Redis: durable, retried with exponential backoff, distributed across worker processes. */
export class BullQueue implements JobQueue {
  readonly kind = 'bullmq' as const;
  private readonly queues = new Map<QueueName, Queue>();
  private readonly workers: Worker[] = [];
  private flows: FlowProducer | null = null;
  private readonly defaults: JobsOptions;
  /** Jobs this process is running, with the lock token that lets it hand them back. */
  private readonly running = new Map<string, { job: Job; token: string | undefined }>();
  private closing: Promise<void> | null = null;
  private readonly extra: Redis[] = [];

  private constructor(
    private readonly redis: Redis,
    private readonly options: BullOptions,
  ) {
    this.defaults = {
      attempts: options.attempts,
      backoff: { type: 'exponential', delay: 1000 },
      removeOnComplete: { age: 7 * 24 * 3600, count: 10_000 },
      removeOnFail: { age: 30 * 24 * 3600 },
    };
  }

  static async open(options: BullOptions): Promise<BullQueue> {
    const redis = await connectRedis(options.url);
    return new BullQueue(redis, options);
  }

  /** A connection of a worker's own; BullMQ does not close connections it was given, so `shut` does. */
  private connection(): Redis {
    const c = this.redis.duplicate();
    this.extra.push(c);
    return c;
  }

  private queue(name: QueueName): Queue {
    let q = this.queues.get(name);
    if (!q) {
      q = new Queue(name, { connection: this.redis, prefix: this.options.prefix, defaultJobOptions: this.defaults });
      q.on('error', (err) => this.options.log.error({ err, queue: name }, 'queue error'));
      this.queues.set(name, q);
    }
    return q;
  }

  private toFlow(spec: JobSpec): FlowJob {
    return {
      name: spec.name,
      queueName: queueOf(spec.name),
      data: spec.data,
      opts: { ...this.defaults, jobId: spec.jobId, failParentOnFailure: true },
      children: spec.children?.map((c) => this.toFlow(c)),
    };
  }

  async add(spec: JobSpec): Promise<void> {
    if (spec.children?.length) {
      this.flows ??= new FlowProducer({ connection: this.redis, prefix: this.options.prefix });
      await this.flows.add(this.toFlow(spec));
    } else {
      await this.queue(queueOf(spec.name)).add(spec.name, spec.data, { jobId: spec.jobId });
    }
  }

  async work(processors: ProcessorMap, options: WorkOptions): Promise<void> {
    assertProcessors(processors, options.queues);
    for (const queueName of options.queues) {
      const worker = new Worker(
        queueName,
        async (job, token) => {
          const name = job.name as JobName;
          const log = this.options.log.child({ queue: queueName, jobId: job.id, jobName: name });
          const processor = processors[name];
          if (!processor) throw new UnrecoverableError(`no processor for ${name}`);
          const key = `${queueName}/${job.id}`;
          this.running.set(key, { job, token });
          try {
            return await processor(job.data, {
              jobId: job.id ?? '',
              name,
              attempt: job.attemptsMade + 1,
              maxAttempts: job.opts.attempts ?? 1,
              log,
              queue: this,
              progress: (value) => job.updateProgress(value),
            });
          } catch (err) {
            log.warn({ err, attempt: job.attemptsMade + 1 }, 'job attempt failed');
            if (err instanceof PermanentError) throw new UnrecoverableError(err.message);
            throw err;
          } finally {
            this.running.delete(key);
          }
        },
        {
          connection: this.connection(),
          prefix: this.options.prefix,
          concurrency: options.concurrency?.[queueName] ?? 1,
          autorun: true,
          // A worker that dies (SIGKILL, lost machine) stops renewing its lock; after lockMs another
          // worker's stalled-job check takes the job back.
          lockDuration: this.options.lockMs ?? 30_000,
          stalledInterval: this.options.lockMs ?? 30_000,
        },
      );
      worker.on('error', (err) => this.options.log.error({ err, queue: queueName }, 'worker error'));
      // BullMQ emits 'failed' for every failed attempt; a job that will be tried again is delayed, not finished.
      worker.on('failed', (job, err) => {
        const where = { queue: queueName, jobId: job?.id, jobName: job?.name, attempt: job?.attemptsMade, reason: err.message };
        if (job && !job.finishedOn) this.options.log.warn({ ...where, retryInMs: job.delay }, 'job will be retried');
        else this.options.log.error(where, 'job failed');
      });
      this.workers.push(worker);
    }
  }

  async drain(timeoutMs = 10 * 60_000): Promise<ReadonlyArray<{ jobId: string; name: JobName; error: string }>> {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      let busy = 0;
      for (const name of QUEUE_NAMES) {
        const c = await this.queue(name).getJobCounts('waiting', 'active', 'delayed', 'waiting-children', 'prioritized');
        busy += Object.values(c).reduce((a, b) => a + b, 0);
      }
      if (busy === 0) return [];
      if (Date.now() > deadline) throw new Error(`queues still busy after ${timeoutMs} ms`);
      await new Promise((r) => setTimeout(r, 100));
    }
  }

  async state(jobId: string, name: JobName): Promise<JobState> {
    const s = await this.queue(queueOf(name)).getJobState(jobId);
    return (['waiting', 'active', 'delayed', 'completed', 'failed', 'waiting-children'] as const).includes(s as never)
      ? (s as JobState)
      : s === 'prioritized' || s === 'waiting-children'
        ? 'waiting'
        : 'unknown';
  }

  async failedReason(jobId: string, name: JobName): Promise<string | null> {
    const job = await this.queue(queueOf(name)).getJob(jobId);
    return job?.failedReason || null;
  }

  async counts(): Promise<Record<QueueName, QueueCounts>> {
    const out = {} as Record<QueueName, QueueCounts>;
    for (const name of QUEUE_NAMES) {
      const c = await this.queue(name).getJobCounts('waiting', 'active', 'delayed', 'completed', 'failed', 'waiting-children', 'prioritized');
      out[name] = {
        waiting: (c.waiting ?? 0) + (c['waiting-children'] ?? 0) + (c.prioritized ?? 0),
        active: c.active ?? 0,
        delayed: c.delayed ?? 0,
        completed: c.completed ?? 0,
        failed: c.failed ?? 0,
      };
    }
    return out;
  }

  async workerCount(queue: QueueName): Promise<number> {
    return this.queue(queue).getWorkersCount();
  }

  async schedule(schedulerId: string, cron: string, timezone: string, spec: Omit<JobSpec, 'jobId' | 'children'>): Promise<void> {
    await this.queue(queueOf(spec.name)).upsertJobScheduler(schedulerId, { pattern: cron, tz: timezone }, { name: spec.name, data: spec.data });
  }

  async schedules(): Promise<ScheduleInfo[]> {
    const out: ScheduleInfo[] = [];
    for (const queue of QUEUE_NAMES) {
      for (const s of await this.queue(queue).getJobSchedulers(0, -1, true)) {
        out.push({
          id: s.key,
          queue,
          name: s.name as JobName,
          data: s.template?.data,
          cron: s.pattern ?? null,
          timezone: s.tz ?? null,
          next: s.next ? new Date(s.next) : null,
        });
      }
    }
    return out;
  }

  /**
   * Stops taking jobs and gives the running ones `graceMs` to finish; any still running then is handed
   * back to the queue (waiting again, its attempt not counted) for another worker, and its processor
   * is abandoned: the caller should end the process, which rolls back what the job had not committed.
   */
  async stop(graceMs: number): Promise<StopResult> {
    await Promise.all(this.workers.map((w) => w.pause(true)));
    const deadline = Date.now() + graceMs;
    while (this.running.size && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
    if (!this.running.size) {
      await this.shut(false);
      return { handedBack: [] };
    }
    // Close the workers first (no fetch in flight could take the job again, no more lock renewal), then
    // move each job still running back to waiting through its queue, with the lock token this worker holds.
    const stuck = [...this.running.values()];
    await Promise.all(this.workers.map((w) => w.close(true)));
    const handedBack: string[] = [];
    for (const { job, token } of stuck) {
      const where = { queue: job.queueName, jobId: job.id, jobName: job.name };
      try {
        const fresh = await Job.fromId(this.queue(job.queueName as QueueName), job.id!);
        if (!fresh) throw new Error('the job is gone from the queue');
        await fresh.moveToWait(token);
        handedBack.push(job.id!);
        this.options.log.warn(where, 'job handed back to the queue (the worker is stopping)');
      } catch (err) {
        // Its lock expires instead, and BullMQ's stalled-job check gives it to another worker.
        this.options.log.warn({ ...where, err }, 'could not hand back a running job');
      }
    }
    await this.shut(true);
    return { handedBack };
  }

  async close(): Promise<void> {
    await this.shut(false);
  }

  private shut(force: boolean): Promise<void> {
    this.closing ??= (async () => {
      await Promise.all(this.workers.map((w) => w.close(force)));
      await Promise.all([...this.queues.values()].map((q) => q.close()));
      await this.flows?.close();
      await Promise.all([this.redis, ...this.extra].map((c) => c.quit().catch(() => c.disconnect())));
    })();
    return this.closing;
  }
}
