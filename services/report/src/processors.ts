import { failRecomputeRun, finishRecomputeRun, mergeRunDetails, SUMMARIES_LOCK } from '@stemwise/db';
import { queueFollowUp, type ServiceDeps } from '@stemwise/core';
import { parsePayload, PermanentError, type ProcessorMap } from '@stemwise/platform';
import { refreshStaleSummaries } from './snapshots';

/**
 * The report service's jobs. `report.summaries {runId}` is the last stage (the root) of a recompute
 * flow: a new snapshot of every region marked stale, then the run is finished. Idempotent: with
 * nothing stale it only finishes the run; content equal to the latest snapshot adds no version.
 */
export function createProcessors(deps: ServiceDeps): ProcessorMap {
  return {
    'report.summaries': async (data, ctx) => {
      const { runId } = parsePayload('report.summaries', data);
      const { db } = deps;
      const result = await db.withLock(SUMMARIES_LOCK, () => refreshStaleSummaries({ db, config: deps.config, log: ctx.log }));
      const details = {
        summaries: {
          regions: result.regions.length,
          versions_created: result.regions.filter((r) => r.created).length,
          rejected: result.rejected,
        },
      };
      await mergeRunDetails(db, runId, details);
      if (result.rejected.length) {
        const reason = `region summaries rejected: ${result.rejected.map((r) => `${r.region} (${r.reason})`).join('; ')}`;
        await failRecomputeRun(db, runId, reason);
        throw new PermanentError('summary_rejected', reason);
      }
      await finishRecomputeRun(db, runId);
      await queueFollowUp({ ...deps, log: ctx.log }, runId); // what became stale during this run is the next run's
      ctx.log.info({ runId, ...details.summaries }, 'region summaries stored');
      return details.summaries;
    },
  };
}
