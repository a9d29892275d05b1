import type { ServiceDeps } from '@stemwise/core';
import type { ProcessorMap, QueueName } from '@stemwise/platform';

export type ServiceName = 'ingest' | 'compute' | 'report';

/** The queues each service serves (compute also runs the maintenance jobs: recompute planning, reconciling). */
export const SERVICE_QUEUES: Record<ServiceName, QueueName[]> = {
  ingest: ['ingest'],
  compute: ['compute', 'maintenance'],
  report: ['report'],
};

type ServiceModule = { createProcessors?: (deps: ServiceDeps) => ProcessorMap };

async function load(service: ServiceName): Promise<ServiceModule> {
  switch (service) {
    case 'ingest':
      return import('@stemwise/ingest') as Promise<ServiceModule>;
    case 'compute':
      return import('@stemwise/compute') as Promise<ServiceModule>;
    case 'report':
      return import('@stemwise/report') as Promise<ServiceModule>;
  }
}

/** The processors of the given services, merged, with the queues they cover. */
export async function processorsFor(deps: ServiceDeps, services: readonly ServiceName[]): Promise<{ processors: ProcessorMap; queues: QueueName[] }> {
  const processors: ProcessorMap = {};
  const queues: QueueName[] = [];
  for (const service of services) {
    const mod = await load(service);
    if (typeof mod.createProcessors !== 'function') throw new Error(`the ${service} service has no processors`);
    Object.assign(processors, mod.createProcessors(deps));
    if (service === 'compute') {
      const { createMaintenanceProcessors } = await import('@stemwise/core');
      Object.assign(processors, createMaintenanceProcessors(deps));
    }
    queues.push(...SERVICE_QUEUES[service]);
  }
  return { processors, queues };
}

function isMissingModule(err: unknown): boolean {
  const e = err as { code?: string; message?: string };
  return e?.code === 'ERR_MODULE_NOT_FOUND' || /cannot find (module|package)|failed to (load|resolve)/i.test(e?.message ?? '');
}

/**
 * Every processor this build has, for running jobs in-process (the CLI without REDIS_URL: recompute,
 * upload --wait, demo). A service whose package has no processors yet is skipped and named in
 * `missing`; `queues` lists only the queues whose every job has a processor here.
 */
export async function availableProcessors(deps: ServiceDeps): Promise<{ processors: ProcessorMap; queues: QueueName[]; missing: ServiceName[] }> {
  const { QUEUE_NAMES, jobNamesOf } = await import('@stemwise/platform');
  const processors: ProcessorMap = {};
  const missing: ServiceName[] = [];
  for (const service of ['ingest', 'compute', 'report'] as const) {
    let mod: ServiceModule;
    try {
      mod = await load(service);
    } catch (err) {
      if (!isMissingModule(err)) throw err;
      missing.push(service);
      continue;
    }
    if (typeof mod.createProcessors !== 'function') {
      missing.push(service);
      continue;
    }
    Object.assign(processors, mod.createProcessors(deps));
    if (service === 'compute') {
      try {
        const { createMaintenanceProcessors } = await import('@stemwise/core');
        Object.assign(processors, createMaintenanceProcessors(deps));
      } catch (err) {
        if (!isMissingModule(err)) throw err;
      }
    }
  }
  const queues = QUEUE_NAMES.filter((q) => jobNamesOf(q).every((name) => typeof processors[name] === 'function'));
  return { processors, queues, missing };
}
