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
  counts(): Promise<Record<QueueName, QueueCounts>>;
  /** A repeating job (the nightly recompute); replaces an earlier schedule of the same id. */
  schedule(schedulerId: string, cron: string, timezone: string, spec: Omit<JobSpec, 'jobId' | 'children'>): Promise<void>;
  /** Stops taking new jobs, lets running ones finish, closes connections. */
  close(): Promise<void>;
}
