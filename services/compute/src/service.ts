import { startReconciler, type ServiceDescriptor } from '@stemwise/core';
import { createProcessors } from './processors';

/** The compute service: plot metrics, fits, and the maintenance queue (planning runs, reconciling). */
export const service: ServiceDescriptor = {
  name: 'compute',
  queues: ['compute', 'maintenance'],
  createProcessors,
  start: startReconciler,
};
