export * from './jobs';
export * from './types';
export { assertProcessors } from './check';
export { InProcessQueue } from './in-process';
import type { Config } from '../config';
import type { Logger } from '../logger';
import { InProcessQueue } from './in-process';
import type { JobQueue } from './types';

// BullMQ (and ioredis) are loaded only when a command needs them: in-process commands start about 0.1 s sooner.
// Tests and code that need the class itself import it from '@stemwise/platform/bullmq'.
/** BullMQ when REDIS_URL is set, else the in-process runner (demo only, no durability). */
export async function openQueue(config: Config, log: Logger): Promise<JobQueue> {
  if (config.redisUrl) {
    const { BullQueue } = await import('./bullmq');
    return BullQueue.open({ url: config.redisUrl, prefix: config.queuePrefix, attempts: config.jobAttempts, log, lockMs: config.jobLockSeconds * 1000 });
  }
  return new InProcessQueue(log);
}
