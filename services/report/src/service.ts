import type { ServiceDescriptor } from '@stemwise/core';
import { createProcessors } from './processors';
import { startReportServer } from './server';

/** The report service: region summaries (the last stage of a recompute) and the HTTP server. */
export const service: ServiceDescriptor = {
  name: 'report',
  queues: ['report'],
  createProcessors,
  async start(deps) {
    const server = await startReportServer(deps);
    return { url: server.url, stop: server.close };
  },
};
