import { listRunningRecomputes } from '@stemwise/db';
import type { ServiceDeps } from '../deps';
import type { JobState } from '@stemwise/platform';

/** Queue states of a job that will still run or is running. */
export const LIVE_STATES: readonly JobState[] = ['waiting', 'active', 'delayed', 'waiting-children'];

/** Each run PostgreSQL has as queued or running, with the queue state of its flow's root (`summaries.<runId>`). */
export async function runsInProgress(deps: Pick<ServiceDeps, 'db' | 'queue'>): Promise<Array<{ runId: string; state: JobState }>> {
  const out: Array<{ runId: string; state: JobState }> = [];
  for (const runId of await listRunningRecomputes(deps.db)) out.push({ runId, state: await deps.queue.state(`summaries.${runId}`, 'report.summaries') });
  return out;
}

/**
 * The run whose flow is still queued or running, or null. A run PostgreSQL calls running whose jobs
 * are gone (Redis lost them, or the process that ran them in-process died) does not count: the
 * reconciler marks it failed. Call it under the planner's lock (PLAN_LOCK).
 */
export async function liveRecompute(deps: Pick<ServiceDeps, 'db' | 'queue'>): Promise<string | null> {
  for (const { runId, state } of await runsInProgress(deps)) if (LIVE_STATES.includes(state)) return runId;
  return null;
}
