import { JOB_NAMES, jobNamesOf, type QueueName } from './jobs';
import type { ProcessorMap } from './types';

/** At worker start: every job name of the served queues has exactly one processor, and none is unknown. */
export function assertProcessors(processors: ProcessorMap, queues: readonly QueueName[]): void {
  for (const name of Object.keys(processors)) {
    if (!(JOB_NAMES as string[]).includes(name)) throw new Error(`assertProcessors: no job is named ${name}`);
  }
  for (const queue of queues) {
    for (const name of jobNamesOf(queue)) {
      if (typeof processors[name] !== 'function') throw new Error(`assertProcessors: job ${name} of queue ${queue} has no processor`);
    }
  }
}
