import { createLogger, loadConfig, openQueue, type Config, type JobQueue, type LogFormat, type Logger } from '@stemwise/platform';
import { migrateDatabase, openDatabase, syncForestTypes, type Db } from '@stemwise/db';

/**
 * Text logs sit between a command's own lines: the pipeline's info entries would drown them, so only
 * warnings and worse are shown, unless STEMWISE_LOG_LEVEL asks for debug or trace (or is quieter).
 */
function textLevel(level: string): string {
  return level === 'info' ? 'warn' : level;
}

/** What a command needs, opened lazily and closed once at the end. */
export class Runtime {
  readonly config: Config;
  readonly log: Logger;
  private db_: Db | null = null;
  private queue_: JobQueue | null = null;

  /** `logs`: the command's log format when STEMWISE_LOG_FORMAT does not set one. */
  constructor(env: Readonly<Record<string, string | undefined>> = process.env, logs: LogFormat = 'text') {
    this.config = loadConfig(env);
    const format = this.config.logFormat ?? logs;
    this.log = createLogger(format === 'text' ? textLevel(this.config.logLevel) : this.config.logLevel, {}, format);
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
