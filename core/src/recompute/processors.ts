import { parsePayload, type ProcessorMap } from '@stemwise/platform';
import type { ServiceDeps } from '../deps';
import { reconcile } from './reconcile';
import { planRecompute } from './recompute';

/** The maintenance queue's jobs: the recompute planner and the reconciler (served by compute workers). */
export function createMaintenanceProcessors(deps: ServiceDeps): ProcessorMap {
  return {
    'maintenance.recompute': async (data, ctx) => {
      const { trigger, all } = parsePayload('maintenance.recompute', data);
      const plan = await planRecompute({ ...deps, log: ctx.log }, trigger, all);
      return plan ? { runId: plan.runId, visits: plan.visits, chunks: plan.chunks } : null;
    },
    'maintenance.reconcile': async (data) => {
      parsePayload('maintenance.reconcile', data);
      return reconcile(deps);
    },
  };
}
