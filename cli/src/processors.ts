import type { ServiceDeps, ServiceDescriptor, ServiceName } from '@stemwise/core';
import { QUEUE_NAMES, jobNamesOf, type ProcessorMap, type QueueName, type WorkOptions } from '@stemwise/platform';

export type { ServiceName } from '@stemwise/core';

/** Every service, in start order; each module is loaded only when its service is run. */
const SERVICES: Record<ServiceName, () => Promise<ServiceDescriptor>> = {
  ingest: async () => (await import('@stemwise/ingest')).service,
  compute: async () => (await import('@stemwise/compute')).service,
  report: async () => (await import('@stemwise/report')).service,
};

export const SERVICE_NAMES = Object.keys(SERVICES) as ServiceName[];

/** The descriptors of the given services. */
export async function loadServices(names: readonly ServiceName[]): Promise<ServiceDescriptor[]> {
  return Promise.all(names.map((name) => SERVICES[name]()));
}

/** What `queue.work` takes: the processors of some services, merged, the queues they serve, and how many jobs of each run at once. */
export type Work = { processors: ProcessorMap } & WorkOptions;

/** The processors of the given services, merged, with the queues they serve (and the configured concurrency of each, in-process too). */
export function processorsOf(deps: ServiceDeps, services: readonly ServiceDescriptor[]): Work & { queues: QueueName[] } {
  const processors: ProcessorMap = {};
  const queues: QueueName[] = [];
  for (const service of services) {
    Object.assign(processors, service.createProcessors(deps));
    queues.push(...service.queues);
  }
  const { config } = deps;
  return { processors, queues, concurrency: { ingest: config.ingestConcurrency, compute: config.computeConcurrency, report: 1, maintenance: 1 } };
}

/** The processors of the named services (loaded), merged, with the queues they serve. */
export async function processorsFor(deps: ServiceDeps, names: readonly ServiceName[]): Promise<Work & { queues: QueueName[] }> {
  return processorsOf(deps, await loadServices(names));
}

/**
 * Every service's processors, for running jobs in-process (the CLI without REDIS_URL: recompute,
 * upload --wait, demo), with every queue.
 */
export async function allProcessors(deps: ServiceDeps): Promise<Work & { queues: QueueName[] }> {
  const found = await processorsFor(deps, SERVICE_NAMES);
  const missing = QUEUE_NAMES.flatMap((q) => jobNamesOf(q)).filter((name) => typeof found.processors[name] !== 'function');
  if (missing.length) throw new Error(`no service has a processor for ${missing.join(', ')}`);
  return found;
}
