import { appendAuditEntries, type AuditEntry, type Queryable } from '@stemwise/db';
import type { Logger } from '@stemwise/platform';

// PostgreSQL text and jsonb cannot hold U+0000, and jsonb refuses an unpaired surrogate: either would
// make the INSERT fail. Both become U+FFFD (the replacement character) before an entry is kept.
const UNSTORABLE = /\u0000|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g;

/** A copy of `value` with every string (keys too) made storable in PostgreSQL text and jsonb. */
export function storable<T>(value: T): T {
  if (typeof value === 'string') return value.replace(UNSTORABLE, '\uFFFD') as T;
  if (Array.isArray(value)) return value.map(storable) as T;
  if (value && typeof value === 'object' && !(value instanceof Date)) {
    return Object.fromEntries(Object.entries(value).map(([k, v]) => [storable(k), storable(v)])) as T;
  }
  return value;
}

/** Tries an entry gets before it is dropped (logged) as one that cannot be stored. */
const MAX_TRIES = 5;

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
  private readonly tries = new WeakMap<AuditEntry, number>();

  constructor(
    private readonly db: Queryable,
    private readonly log: Logger,
    intervalMs = 250,
    private readonly maxPending = 2000,
  ) {
    this.timer = setInterval(() => void this.flush(), intervalMs);
    this.timer.unref();
  }

  record(raw: Omit<AuditEntry, 'at'>): void {
    const entry = storable(raw);
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
    await appendAuditEntries(this.db, [{ ...storable(entry), at: new Date() }]);
  }

  flush(): Promise<void> {
    if (!this.pending.length) return this.flushing;
    const batch = this.take();
    this.flushing = this.flushing.then(() => this.write(batch));
    return this.flushing;
  }

  /**
   * One INSERT for the batch; if it fails, one INSERT per entry, so an entry the database refuses
   * cannot hold back the others. Entries that failed are kept for the next flush (the database may be
   * restarting) until they have failed MAX_TRIES times; the backlog is bounded.
   */
  private async write(batch: AuditEntry[]): Promise<void> {
    try {
      await appendAuditEntries(this.db, batch);
      return;
    } catch (err) {
      if (batch.length === 1) return this.retryLater(batch, err);
    }
    const failed: AuditEntry[] = [];
    let lastErr: unknown = null;
    for (const entry of batch) {
      try {
        await appendAuditEntries(this.db, [entry]);
      } catch (err) {
        failed.push(entry);
        lastErr = err;
      }
    }
    if (failed.length) this.retryLater(failed, lastErr);
  }

  private retryLater(entries: AuditEntry[], err: unknown): void {
    const keep: AuditEntry[] = [];
    for (const e of entries) {
      const n = (this.tries.get(e) ?? 0) + 1;
      this.tries.set(e, n);
      if (n < MAX_TRIES) keep.push(e);
      else this.log.error({ err, actor: e.actor, action: e.action, target: e.target }, 'audit entry dropped after repeated write failures');
    }
    if (keep.length) this.log.error({ err, entries: keep.length }, 'audit entries could not be written; retrying');
    this.pending = keep.concat(this.pending).slice(-50_000);
  }

  /** Stops the timer and writes what is pending (called when the server closes). */
  async close(): Promise<void> {
    clearInterval(this.timer);
    await this.flushing;
    await this.flush();
  }
}
