import { createLogger, loadConfig, openQueue, type Config, type JobQueue, type Logger } from '@stemwise/platform';
import { migrateDatabase, openDatabase, syncForestTypes, type Db } from '@stemwise/db';

/** What a command needs, opened lazily and closed once at the end. */
export class Runtime {
  readonly config: Config;
  readonly log: Logger;
  private db_: Db | null = null;
  private queue_: JobQueue | null = null;

  constructor(env: Readonly<Record<string, string | undefined>> = process.env) {
    this.config = loadConfig(env);
    this.log = createLogger(this.config.logLevel);
  }

  /** The database, migrated to the current schema (embedded PGlite when DATABASE_URL is unset). */
  async db(): Promise<Db> {
    if (!this.db_) {
      const db = await openDatabase(this.config);
      try {
        await migrateDatabase(db);
        await syncForestTypes(db, this.config.forestTypes);
      } catch (err) {
        await db.close().catch(() => {});
        throw err;
      }
      this.db_ = db;
    }
    return this.db_;
  }

  async queue(): Promise<JobQueue> {
    this.queue_ ??= await openQueue(this.config, this.log);
    return this.queue_;
  }

  async close(): Promise<void> {
    await this.queue_?.close().catch(() => {});
    await this.db_?.close().catch(() => {});
  }
}
