import { appendAuditEntries, type AuditEntry, type Queryable } from '@stemwise/db';
import type { Logger } from '@stemwise/platform';

/**
 * Collects audit entries and writes them in batches (one INSERT … unnest per flush): every token use
 * is recorded without a database round trip on the request path. Identical uses within one window (same
 * token, action, route, parameters and status) become one row with `details.uses` (the count) and
 * `details.last_at`, so a busy reader does not turn the audit log into the hot path. Flushes every
 * `intervalMs` (250 ms) or at `maxPending` distinct entries, and on close. A crash can lose at most the
 * last interval's entries; batch submissions are written at once instead (see `writeNow`).
 */
export class AuditWriter {
  private pending: AuditEntry[] = [];
  private readonly index = new Map<string, { entry: AuditEntry; uses: number; last: Date }>();
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
    const now = new Date();
    const key = `${entry.actor}\u0000${entry.action}\u0000${entry.target}\u0000${JSON.stringify(entry.details ?? {})}`;
    const seen = this.index.get(key);
    if (seen) {
      seen.uses++;
      seen.last = now;
      return;
    }
    const fresh: AuditEntry = { ...entry, at: now };
    this.index.set(key, { entry: fresh, uses: 1, last: now });
    this.pending.push(fresh);
    if (this.pending.length >= this.maxPending) void this.flush();
  }

  /** The pending entries with their use counts folded into `details`. */
  private take(): AuditEntry[] {
    const out = this.pending.map((e) => e);
    for (const { entry, uses, last } of this.index.values()) {
      if (uses > 1) entry.details = { ...(entry.details ?? {}), uses, last_at: last.toISOString() };
    }
    this.pending = [];
    this.index.clear();
    return out;
  }

  /** Writes one entry now (for actions that must not be lost, such as a batch submission). */
  async writeNow(entry: Omit<AuditEntry, 'at'>): Promise<void> {
    await appendAuditEntries(this.db, [{ ...entry, at: new Date() }]);
  }

  flush(): Promise<void> {
    if (!this.pending.length) return this.flushing;
    const batch = this.take();
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
