import { z } from 'zod';

// The one home of queue names, job names and their payloads. Payloads carry references, never rows:
// the data lives in PostgreSQL. Every job id is deterministic, so a duplicate add is a no-op.

export const QUEUE_NAMES = ['ingest', 'compute', 'report', 'maintenance'] as const;
export type QueueName = (typeof QUEUE_NAMES)[number];

const runId = z.string().regex(/^[A-Za-z0-9_-]{1,64}$/, 'a run id of letters, digits, _ and -');

export const JOBS = {
  /** Validate a stored upload and load it in one transaction. */
  'ingest.batch': { queue: 'ingest', payload: z.object({ batchId: z.string().uuid() }) },
  /** Parent of a recompute: completes when all its plot-chunk children did. */
  'compute.plots': { queue: 'compute', payload: z.object({ runId }) },
  /** Metrics of a list of plot visits (overwrites their rows). */
  'compute.plot-chunk': {
    queue: 'compute',
    payload: z.object({ runId, visitIds: z.array(z.number().int().positive()).min(1).max(100_000) }),
  },
  /** Diversity–disturbance fits of every forest type whose plots changed. */
  'compute.fits': { queue: 'compute', payload: z.object({ runId }) },
  /** A new summary snapshot of every region whose plots or fits changed. */
  'report.summaries': { queue: 'report', payload: z.object({ runId }) },
  /** Find what is stale and start a recompute flow for it (nightly, or on demand). */
  'maintenance.recompute': {
    queue: 'maintenance',
    payload: z.object({ all: z.boolean().default(false), trigger: z.enum(['nightly', 'manual', 'batch', 'reconcile']).default('manual') }),
  },
  /** Queue again what PostgreSQL says is due but no queued job covers. */
  'maintenance.reconcile': { queue: 'maintenance', payload: z.object({}) },
} as const satisfies Record<string, { queue: QueueName; payload: z.ZodType }>;

export type JobName = keyof typeof JOBS;
export type JobPayload<N extends JobName> = z.input<(typeof JOBS)[N]['payload']>;
export type ParsedPayload<N extends JobName> = z.output<(typeof JOBS)[N]['payload']>;
export const JOB_NAMES = Object.keys(JOBS) as JobName[];

/** Parses a payload with its schema (the first line of every processor). */
export function parsePayload<N extends JobName>(name: N, data: unknown): ParsedPayload<N> {
  return JOBS[name].payload.parse(data) as ParsedPayload<N>;
}

export function queueOf(name: JobName): QueueName {
  return JOBS[name].queue;
}

export function jobNamesOf(queue: QueueName): JobName[] {
  return JOB_NAMES.filter((n) => JOBS[n].queue === queue);
}
