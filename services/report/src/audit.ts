import { appendAuditEntries, type AuditEntry, type Queryable } from '@stemwise/db';
import type { Logger } from '@stemwise/platform';

/**
 * Collects audit entries and writes them in batches (one INSERT … unnest per flush): every token use
 * is recorded without a database round trip on the request path. Flushes every `intervalMs` (250 ms)
 * or at `maxPending` entries, and on close. A crash can lose at most the last interval's entries;
 * batch submissions are written at once instead (see `writeNow`).
 */
export class AuditWriter {
  private pending: AuditEntry[] = [];
  private readonly timer: NodeJS.Timeout;
  private flushing: Promise<void> = Promise.resolve();

  constructor(
    private readonly db: Queryable,
    private readonly log: Logger,
    intervalMs = 250,
    private readonly maxPending = 2000,
  ) {
    this.timer = setInterval(() => void this.flush(), intervalMs);
    this.timer.unref();
  }

  record(entry: Omit<AuditEntry, 'at'>): void {
    this.pending.push({ ...entry, at: new Date() });
    if (this.pending.length >= this.maxPending) void this.flush();
  }

  /** Writes one entry now (for actions that must not be lost, such as a batch submission). */
  async writeNow(entry: Omit<AuditEntry, 'at'>): Promise<void> {
    await appendAuditEntries(this.db, [{ ...entry, at: new Date() }]);
  }

  flush(): Promise<void> {
    if (!this.pending.length) return this.flushing;
    const batch = this.pending;
    this.pending = [];
    this.flushing = this.flushing.then(async () => {
      try {
        await appendAuditEntries(this.db, batch);
      } catch (err) {
        // Keep them for the next flush (the database may be restarting); bound the backlog.
        this.log.error({ err, entries: batch.length }, 'audit entries could not be written; retrying');
        this.pending = batch.concat(this.pending).slice(-50_000);
      }
    });
    return this.flushing;
  }

  async close(): Promise<void> {
    clearInterval(this.timer);
    await this.flush();
    await this.flushing;
  }
}
