import type { ServiceDescriptor } from '@stemwise/core';
import { createProcessors } from './processors';

/** The ingest service: validates and loads submitted batches. */
export const service: ServiceDescriptor = {
  name: 'ingest',
  queues: ['ingest'],
  createProcessors,
};
