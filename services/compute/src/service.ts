import { startReconciler, type ServiceDescriptor } from '@stemwise/core';
import { closeMetricsPool } from './metrics-pool';
import { createProcessors } from './processors';

/** The compute service: plot metrics, fits, and the maintenance queue (planning runs, reconciling). */
export const service: ServiceDescriptor = {
  name: 'compute',
  queues: ['compute', 'maintenance'],
  createProcessors,
  // The reconcile timer; on stop, the metrics threads end too (once the running jobs are done or handed back).
  async start(deps) {
    const reconciler = await startReconciler(deps);
    return {
      async stop() {
        await reconciler.stop();
        await closeMetricsPool();
      },
    };
  },
};
