export * from './jobs';
export * from './types';
export { assertProcessors } from './check';
export { InProcessQueue } from './in-process';
export { BullQueue, connectRedis, redactUrl } from './bullmq';
import type { Config } from '../config';
import type { Logger } from '../logger';
import { BullQueue } from './bullmq';
import { InProcessQueue } from './in-process';
import type { JobQueue } from './types';

/** BullMQ when REDIS_URL is set, else the in-process runner (demo only, no durability). */
export async function openQueue(config: Config, log: Logger): Promise<JobQueue> {
  if (config.redisUrl) {
    return BullQueue.open({ url: config.redisUrl, prefix: config.queuePrefix, attempts: config.jobAttempts, log, lockMs: config.jobLockSeconds * 1000 });
  }
  return new InProcessQueue(log);
}
