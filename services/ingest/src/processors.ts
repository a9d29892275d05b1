import { batchLockKey, getBatch, deleteBatchIssues, markBatchFailed, startBatchValidation } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { oneLine, parsePayload, PermanentError, type JobContext, type ProcessorMap } from '@stemwise/platform';
import { ingestBatch, type IngestOptions } from './ingest-batch';
import { isDataError } from './load/data-refused';

/** Queues the recompute a loaded batch needs (deterministic id: a retry adds nothing). */
async function queueRecompute(deps: ServiceDeps, batchId: string): Promise<void> {
  await deps.queue.add({ name: 'maintenance.recompute', data: { all: false, trigger: 'batch' }, jobId: `recompute.batch.${batchId}` });
}

/**
 * The `ingest.batch` job. Safe to run again at any point: a batch already loaded only re-queues its
 * recompute; a batch caught mid-validation (a worker died) starts over with its issues cleared, and
 * since the load is one transaction, nothing of the earlier attempt is in the database.
 */
export async function processBatch(deps: ServiceDeps, batchId: string, job?: JobContext, options: Omit<IngestOptions, 'job'> = {}): Promise<{ state: string }> {
  // One attempt at a time per batch: a job handed back by a stopping worker may be taken again while
  // the first attempt is still rolling back; the second waits here, then sees the batch's real state.
  return deps.db.withLock(batchLockKey(batchId), () => attempt(deps, batchId, job, options));
}

async function attempt(deps: ServiceDeps, batchId: string, job: JobContext | undefined, options: Omit<IngestOptions, 'job'>): Promise<{ state: string }> {
  const { db } = deps;
  const batch = await getBatch(db, batchId);
  if (!batch) throw new PermanentError('ingest_unknown_batch', `there is no batch ${batchId}`);
  if (batch.state === 'loaded') {
    await queueRecompute(deps, batchId);
    return { state: batch.state };
  }
  if (batch.state !== 'received' && batch.state !== 'validating') return { state: batch.state };
  if (!(await startBatchValidation(db, batchId))) return { state: (await getBatch(db, batchId))?.state ?? 'unknown' };
  await deleteBatchIssues(db, batchId);
  job?.log.info({ batchId, attempt: job.attempt }, 'validating batch');
  let outcome;
  try {
    outcome = await ingestBatch(deps, { ...batch, state: 'validating' }, { ...options, job });
  } catch (err) {
    const now = await getBatch(db, batchId).catch(() => null);
    if (now?.state === 'loaded') {
      await queueRecompute(deps, batchId); // another attempt loaded it meanwhile
      return { state: now.state };
    }
    const permanent = err instanceof PermanentError || isDataError(err);
    const lastTry = deps.queue.kind === 'in-process' || (job?.attempt ?? 1) >= (job?.maxAttempts ?? deps.config.jobAttempts);
    if (permanent || lastTry) await markBatchFailed(db, batchId, oneLine(err)).catch(() => {});
    if (permanent && !(err instanceof PermanentError)) throw new PermanentError('ingest_failed', `batch ${batchId} could not be loaded: ${oneLine(err)}`, { cause: err });
    throw err;
  }
  job?.log.info({ batchId, ...outcome.counts, state: outcome.state }, 'batch validated');
  if (outcome.state === 'loaded') await queueRecompute(deps, batchId);
  return { state: outcome.state };
}

/** Processors of the ingest queue. */
export function createProcessors(deps: ServiceDeps): ProcessorMap {
  return {
    'ingest.batch': async (data, ctx) => {
      const { batchId } = parsePayload('ingest.batch', data);
      return processBatch(deps, batchId, ctx);
    },
  };
}
