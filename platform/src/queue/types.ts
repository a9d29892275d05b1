import type { Logger } from '../logger';
import type { JobName, JobPayload, QueueName } from './jobs';

/** One job to add; with children it is a flow: the children run first, the parent when all completed. */
export interface JobSpec<N extends JobName = JobName> {
  name: N;
  data: JobPayload<N>;
  /** Deterministic id: adding a job whose id exists already does nothing. Letters, digits, . _ - only. */
  jobId: string;
  children?: JobSpec[];
}

export interface JobContext {
  jobId: string;
  name: JobName;
  attempt: number;
  /** Attempts this job has in all (set by whoever queued it); `attempt >= maxAttempts` is its last try. */
  maxAttempts?: number;
  log: Logger;
  queue: JobQueue;
  progress(value: number | Record<string, number>): Promise<void>;
}

export type Processor = (data: unknown, ctx: JobContext) => Promise<unknown>;
export type ProcessorMap = Partial<Record<JobName, Processor>>;

export type JobState = 'waiting' | 'active' | 'delayed' | 'completed' | 'failed' | 'waiting-children' | 'unknown';

export interface QueueCounts {
  waiting: number;
  active: number;
  delayed: number;
  completed: number;
  failed: number;
}

/** A repeating job as the queue holds it. */
export interface ScheduleInfo {
  id: string;
  queue: QueueName;
  name: JobName;
  /** The payload every run gets. */
  data: unknown;
  cron: string | null;
  timezone: string | null;
  /** When it runs next. */
  next: Date | null;
}

export interface StopResult {
  /** Ids of jobs that were still running when the grace time ran out, now waiting again for another worker. */
  handedBack: string[];
}

export interface WorkOptions {
  /** Queues this process serves; every job name of them must have exactly one processor. */
  queues: readonly QueueName[];
  concurrency?: Partial<Record<QueueName, number>>;
}

/** What runs jobs. BullMQ on Redis in production; in-process (no durability) for the one-machine demo. */
export interface JobQueue {
  readonly kind: 'bullmq' | 'in-process';
  add(spec: JobSpec): Promise<void>;
  /** Starts processing the given queues with these processors. */
  work(processors: ProcessorMap, options: WorkOptions): Promise<void>;
  /** In-process: runs until nothing is queued and returns the failures. BullMQ: waits until the queues are idle. */
  drain(timeoutMs?: number): Promise<ReadonlyArray<{ jobId: string; name: JobName; error: string }>>;
  state(jobId: string, name: JobName): Promise<JobState>;
  /** Why a failed job failed (its last error), or null. */
  failedReason(jobId: string, name: JobName): Promise<string | null>;
  counts(): Promise<Record<QueueName, QueueCounts>>;
  /** Worker processes connected to a queue now (BullMQ: named Redis clients); in-process: 1 if this process serves it, else 0. */
  workerCount(queue: QueueName): Promise<number>;
  /** A repeating job (the nightly recompute); replaces an earlier schedule of the same id. */
  schedule(schedulerId: string, cron: string, timezone: string, spec: Omit<JobSpec, 'jobId' | 'children'>): Promise<void>;
  /** The repeating jobs registered (none in-process). */
  schedules(): Promise<ScheduleInfo[]>;
  /**
   * A worker's graceful stop: takes no new jobs, gives running ones `graceMs` to finish, hands back
   * those still running (BullMQ: waiting again for another worker), closes connections.
   */
  stop(graceMs: number): Promise<StopResult>;
  /** Stops taking new jobs, lets running ones finish, closes connections. */
  close(): Promise<void>;
}
