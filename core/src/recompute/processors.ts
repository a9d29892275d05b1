import { parsePayload, type ProcessorMap } from '@stemwise/platform';
import type { ServiceDeps } from '../deps';
import { reconcile } from './reconcile';

/** Maintenance jobs other than the recompute planner: the reconciler. */
export function createMaintenanceProcessors(deps: ServiceDeps): ProcessorMap {
  return {
    'maintenance.reconcile': async (data) => {
      parsePayload('maintenance.reconcile', data);
      return reconcile(deps);
    },
  };
}
