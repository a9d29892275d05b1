import { failRecomputeRun, hasStaleWork, listRunningRecomputes, listUnfinishedBatches, markBatchFailed, type ServiceDeps } from '@stemwise/db';
import type { JobState } from '@stemwise/platform';

export interface ReconcileReport {
  batchesRequeued: string[];
  batchesFailed: string[];
  runsAbandoned: string[];
  recomputeQueued: boolean;
}

const LIVE: readonly JobState[] = ['waiting', 'active', 'delayed', 'waiting-children'];

/**
 * PostgreSQL says what is due; Redis only carries work. Queues again, under the same deterministic ids,
 * every batch ingest and every recompute that no queued job covers (after Redis lost its data, say), and
 * marks as failed what BullMQ gave up on. Safe to run at any time and from several workers at once.
 */
export async function reconcile(deps: ServiceDeps, now = new Date()): Promise<ReconcileReport> {
  const { db, queue, log } = deps;
  const report: ReconcileReport = { batchesRequeued: [], batchesFailed: [], runsAbandoned: [], recomputeQueued: false };

  for (const batch of await listUnfinishedBatches(db)) {
    const jobId = `ingest.${batch.id}`;
    const state = await queue.state(jobId, 'ingest.batch');
    if (LIVE.includes(state)) continue;
    if (state === 'failed') {
      await markBatchFailed(db, batch.id, 'ingest failed after its retries (see the worker log)');
      report.batchesFailed.push(batch.id);
      continue;
    }
    if (state === 'completed') continue; // its processor updates the state; nothing to redo
    await queue.add({ name: 'ingest.batch', data: { batchId: batch.id }, jobId });
    report.batchesRequeued.push(batch.id);
  }

  let running = false;
  for (const runId of await listRunningRecomputes(db)) {
    const state = await queue.state(`summaries.${runId}`, 'report.summaries');
    if (LIVE.includes(state)) {
      running = true;
      continue;
    }
    if (state !== 'completed') {
      await failRecomputeRun(db, runId, state === 'failed' ? 'a job of the run failed' : 'its jobs were lost from the queue');
      report.runsAbandoned.push(runId);
    }
  }

  if (!running && (await hasStaleWork(db))) {
    // One id per minute: several workers reconciling at once queue it once.
    const bucket = now.toISOString().slice(0, 16).replace(/[-:T]/g, '');
    await queue.add({ name: 'maintenance.recompute', data: { all: false, trigger: 'reconcile' }, jobId: `recompute.reconcile.${bucket}` });
    report.recomputeQueued = true;
  }
  if (report.batchesRequeued.length || report.batchesFailed.length || report.runsAbandoned.length || report.recomputeQueued) {
    log.info({ reconcile: report }, 'reconciled due work with the queues');
  }
  return report;
}
