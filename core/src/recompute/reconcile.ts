import { failRecomputeRun, hasStaleWork, listUnfinishedBatches, markBatchFailed, PLAN_LOCK } from '@stemwise/db';
import type { ServiceDeps } from '../deps';
import { LIVE_STATES as LIVE, runsInProgress } from './live-run';
import { ensureSchedules } from './schedules';

export interface ReconcileReport {
  batchesRequeued: string[];
  batchesFailed: string[];
  runsAbandoned: string[];
  recomputeQueued: boolean;
  /** Schedules registered again (Redis lost them, or their settings changed). */
  schedulesRegistered: string[];
}

/** Id of the recompute the reconciler queues: one per minute, so workers reconciling at once queue it once. */
export function reconcileJobId(now: Date): string {
  return `recompute.reconcile.${now.toISOString().slice(0, 16).replace(/[-:T]/g, '')}`;
}

/**
 * PostgreSQL says what is due; Redis only carries work. Queues again, under the same deterministic ids,
 * every batch ingest and every recompute that no queued job covers (after Redis lost its data, say),
 * registers the nightly schedule again if Redis lost it, and marks as failed, with BullMQ's reason, what
 * BullMQ gave up on. Safe to run at any time and from several workers at once: the recompute part holds
 * the planner's lock, so it never judges a run that a planner is queueing right now.
 */
export async function reconcile(deps: ServiceDeps, now = new Date()): Promise<ReconcileReport> {
  const { db, queue, log } = deps;
  const report: ReconcileReport = { batchesRequeued: [], batchesFailed: [], runsAbandoned: [], recomputeQueued: false, schedulesRegistered: [] };

  for (const batch of await listUnfinishedBatches(db)) {
    const jobId = `ingest.${batch.id}`;
    const state = await queue.state(jobId, 'ingest.batch');
    if (LIVE.includes(state)) continue;
    if (state === 'failed') {
      const reason = (await queue.failedReason(jobId, 'ingest.batch')) ?? 'the ingest job failed after its retries (see the worker log)';
      await markBatchFailed(db, batch.id, reason);
      report.batchesFailed.push(batch.id);
      continue;
    }
    if (state === 'completed') continue; // its processor updates the state; nothing to redo
    await queue.add({ name: 'ingest.batch', data: { batchId: batch.id }, jobId });
    report.batchesRequeued.push(batch.id);
  }

  await db.withLock(PLAN_LOCK, async () => {
    let running = false;
    for (const { runId, state } of await runsInProgress(deps)) {
      if (LIVE.includes(state)) {
        running = true;
        continue;
      }
      if (state !== 'completed') {
        const reason = state === 'failed' ? `a job of the run failed: ${(await queue.failedReason(`summaries.${runId}`, 'report.summaries')) ?? 'see the worker log'}` : 'its jobs were lost from the queue';
        await failRecomputeRun(db, runId, reason);
        report.runsAbandoned.push(runId);
      }
    }
    // A planner job already waiting will take the stale work; a second one would plan the same visits twice.
    const planners = queue.kind === 'bullmq' ? (await queue.counts()).maintenance.waiting : 0;
    if (!running && planners === 0 && (await hasStaleWork(db))) {
      await queue.add({ name: 'maintenance.recompute', data: { all: false, trigger: 'reconcile' }, jobId: reconcileJobId(now) });
      report.recomputeQueued = true;
    }
  });

  report.schedulesRegistered = await ensureSchedules(deps);
  if (report.batchesRequeued.length || report.batchesFailed.length || report.runsAbandoned.length || report.recomputeQueued || report.schedulesRegistered.length) {
    log.info({ reconcile: report }, 'reconciled due work with the queues');
  }
  return report;
}
