import { mergeRunDetails, recordRunStage } from '@stemwise/db';
import { createMaintenanceProcessors, finishPlotsStage, type ServiceDeps } from '@stemwise/core';
import { parsePayload, type ProcessorMap } from '@stemwise/platform';
import { refreshStaleFits } from './fits';
import { computePlotChunk } from './plot-chunk';

/**
 * The compute service's processors: `compute.*`, and the maintenance jobs (the recompute planner and
 * the reconciler, from the recompute lifecycle in @stemwise/core). Each parses its payload first; the
 * context's logger carries { queue, jobId, jobName }.
 */
export function createProcessors(deps: ServiceDeps): ProcessorMap {
  return {
    ...createMaintenanceProcessors(deps),
    'compute.plot-chunk': async (data, ctx) => {
      const { runId, visitIds } = parsePayload('compute.plot-chunk', data);
      const counts = await computePlotChunk({ ...deps, log: ctx.log }, runId, visitIds, ctx.jobId);
      ctx.log.info({ runId, ...counts }, 'plot metrics written');
      return counts;
    },
    'compute.plots': async (data, ctx) => {
      const { runId } = parsePayload('compute.plots', data);
      const stage = await finishPlotsStage(deps, runId);
      if (stage && stage.chunksPlanned !== null && stage.chunks !== stage.chunksPlanned) {
        ctx.log.warn({ runId, ...stage }, 'fewer chunks recorded than planned');
      }
      ctx.log.info({ runId, ...stage }, 'plot metrics stage complete');
      return stage;
    },
    'compute.fits': async (data, ctx) => {
      const { runId } = parsePayload('compute.fits', data);
      const start = Date.now();
      const fits = await refreshStaleFits({ ...deps, log: ctx.log, runId });
      await mergeRunDetails(deps.db, runId, { fits });
      await recordRunStage(deps.db, runId, 'fits', { start, ms: Date.now() - start, forestTypes: fits.length });
      const problems = fits.filter((f) => f.problems).map((f) => ({ forestType: f.forestType, problems: f.problems }));
      if (problems.length) ctx.log.warn({ runId, problems }, 'some fits could not be computed; the others are stored');
      ctx.log.info({ runId, forestTypes: fits.map((f) => f.forestType) }, 'fits stored');
      return { forestTypes: fits.length };
    },
  };
}
