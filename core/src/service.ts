import type { ProcessorMap, QueueName } from '@stemwise/platform';
import type { ServiceDeps } from './deps';

export type ServiceName = 'ingest' | 'compute' | 'report';

/** What a service started beside its workers (a timer, an HTTP server), and how to stop it. */
export interface StartedService {
  /** Where it listens, when it does. */
  url?: string;
  stop(): Promise<void>;
}

/**
 * How a service is run — the one wiring rule: each service exports one descriptor, and the CLI loops
 * over them. `queues` are the queues whose jobs its processors take; `start` (when given) starts what
 * else it runs once its workers take jobs, and returns the handle that stops it.
 */
export interface ServiceDescriptor {
  readonly name: ServiceName;
  readonly queues: readonly QueueName[];
  createProcessors(deps: ServiceDeps): ProcessorMap;
  start?(deps: ServiceDeps): Promise<StartedService>;
}
