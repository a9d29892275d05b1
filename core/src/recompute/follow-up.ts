import { getRecomputeRun, hasStaleWork, PLAN_LOCK } from '@stemwise/db';
import type { ServiceDeps } from '../deps';
import type { RecomputeTrigger } from './recompute';

/**
 * Called when a run has ended (done): queues the planner of the next run if a planner found this one
 * running and left its work to it (its trigger is kept in the run's details as `deferred`), or if
 * anything is stale. Under the planner's lock, so a planner either saw this run running and recorded
 * that before, or sees it done and plans by itself. One follow-up per run (its job id is the run's).
 */
export async function queueFollowUp(deps: ServiceDeps, runId: string): Promise<boolean> {
  return deps.db.withLock(PLAN_LOCK, async () => {
    const run = await getRecomputeRun(deps.db, runId);
    const deferred = run?.details.deferred as RecomputeTrigger | undefined;
    if (!deferred && !(await hasStaleWork(deps.db))) return false;
    await deps.queue.add({ name: 'maintenance.recompute', data: { all: false, trigger: deferred ?? 'reconcile' }, jobId: `recompute.after.${runId}` });
    deps.log.info({ runId, trigger: deferred ?? 'reconcile' }, 'the next recompute is queued for what became stale during this one');
    return true;
  });
}
