import { mergeRunDetails } from '@stemwise/db';
import { finishPlotsStage, planRecompute, type ServiceDeps } from '@stemwise/core';
import { parsePayload, type ProcessorMap } from '@stemwise/platform';
import { refreshStaleFits } from './fits';
import { computePlotChunk } from './plot-chunk';

/**
 * The compute service's processors: `compute.*` and the recompute planner `maintenance.recompute`
 * (`maintenance.reconcile` lives in maintenance/processors.ts). Each parses its payload first; the
 * context's logger carries { queue, jobId, jobName }.
 */
export function createProcessors(deps: ServiceDeps): ProcessorMap {
  return {
    'maintenance.recompute': async (data, ctx) => {
      const { trigger, all } = parsePayload('maintenance.recompute', data);
      const plan = await planRecompute({ ...deps, log: ctx.log }, trigger, all);
      return plan ? { runId: plan.runId, visits: plan.visits, chunks: plan.chunks } : null;
    },
    'compute.plot-chunk': async (data, ctx) => {
      const { runId, visitIds } = parsePayload('compute.plot-chunk', data);
      const counts = await computePlotChunk(deps, runId, visitIds, ctx.jobId);
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
      const fits = await refreshStaleFits({ ...deps, log: ctx.log });
      await mergeRunDetails(deps.db, runId, { fits });
      ctx.log.info({ runId, forestTypes: fits.map((f) => f.forestType) }, 'fits stored');
      return { forestTypes: fits.length };
    },
  };
}
