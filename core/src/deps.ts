import type { Config, JobQueue, Logger } from '@stemwise/platform';
import type { Db } from '@stemwise/db';

/** What a service's processors and routes are built from (opened once per process by the CLI). */
export interface ServiceDeps {
  config: Config;
  db: Db;
  log: Logger;
  queue: JobQueue;
}
