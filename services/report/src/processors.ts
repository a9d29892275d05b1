import { clearProblems, failRecomputeRun, finishRecomputeRun, mergeRunDetails, problemLine, recordProblems, recordRunStage, SUMMARIES_LOCK } from '@stemwise/db';
import { NATIONAL, queueFollowUp, type ServiceDeps } from '@stemwise/core';
import { parsePayload, PermanentError, type ProcessorMap } from '@stemwise/platform';
import { refreshNationalSummary } from './national-snapshot';
import { RegionSummaryInputError } from './summary/input';
import { refreshStaleSummaries, type RegionPlotsCache } from './snapshots';

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
      const start = Date.now();
      const result = await db.withLock(SUMMARIES_LOCK, async () => {
        const plots: RegionPlotsCache = new Map(); // each region's plots read once, for its summary and the national one
        const regions = await refreshStaleSummaries({ db, config: deps.config, log: ctx.log, runId, plots });
        // The national summary mixes every region: only once they all went through, else it stays stale.
        if (regions.rejected.length) return { ...regions, national: null };
        try {
          const national = await refreshNationalSummary({ db, config: deps.config, log: ctx.log, plots });
          await clearProblems(db, 'summary', [NATIONAL]);
          return { ...regions, national };
        } catch (err) {
          if (!(err instanceof RegionSummaryInputError)) throw err;
          // Like a region whose summary cannot be built: the last good version stays, the reason is
          // recorded (batch show, the API, the run's log) and the run still ends done.
          ctx.log.error({ err, runId }, 'national summary rejected its input; the region summaries are stored');
          await recordProblems(db, runId, [{ stage: 'summary', forestType: null, region: NATIONAL, visitId: null, plotKey: null, reason: err.message }]);
          return { ...regions, national: null, rejected: [...regions.rejected, { region: NATIONAL, reason: err.message }] };
        }
      });
      const details = {
        summaries: {
          regions: result.regions.length,
          versions_created: result.regions.filter((r) => r.created).length,
          national: result.national,
          rejected: result.rejected,
        },
      };
      await mergeRunDetails(db, runId, details);
      await recordRunStage(db, runId, 'summaries', { start, ms: Date.now() - start, regions: details.summaries.regions, versions: details.summaries.versions_created });
      // A region, forest type or plot that could not be computed does not fail the run: the run ends
      // done, with what it could not compute in compute_problems (and its count in the run's details).
      const problems = await finishRecomputeRun(db, runId);
      if (problems.length) ctx.log.warn({ runId, problems: problems.map(problemLine) }, 'recompute done; some parts could not be computed');
      await queueFollowUp({ ...deps, log: ctx.log }, runId); // what became stale during this run is the next run's
      ctx.log.info({ runId, ...details.summaries }, 'region summaries stored');
      return details.summaries;
    },
  };
}
