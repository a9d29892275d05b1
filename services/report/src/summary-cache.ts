import { getSummarySnapshot, listLatestSummaryVersions, type Queryable } from '@stemwise/db';
import type { Snapshot, SnapshotPayload } from './snapshot-payload';
import { summaryCsv, summaryJson } from './representations';

/** How long the last known versions are used while the database does not answer. */
export const STALE_IF_ERROR_MS = 60_000;

export interface CachedSnapshot {
  readonly snapshot: Snapshot;
  readonly json: Buffer;
  readonly csv: Buffer;
}

/**
 * Snapshots in memory, keyed by (region, version): a version never changes once stored, so an entry
 * never goes stale; only "which version is the latest" does, and that is read with one cheap query at
 * most every `checkMs` (default 1 s) for all regions at once. Entries (a snapshot with its chart specifications,
 * its JSON and CSV) are evicted least-recently used beyond `maxEntries`.
 */
export class SummaryCache {
  private latest: Map<string, number | null> = new Map();
  private checkedAt = -Infinity;
  private readAt = -Infinity;
  private refreshing: Promise<void> | null = null;
  private readonly entries = new Map<string, Promise<CachedSnapshot | null>>();

  private timer: NodeJS.Timeout | null = null;

  constructor(
    private readonly db: Queryable,
    private readonly checkMs = 1000,
    private readonly maxEntries = 64,
  ) {}

  /** Re-reads the latest versions in the background every checkMs/2, so requests do not wait on it. */
  start(): this {
    if (this.checkMs > 0 && !this.timer) {
      this.timer = setInterval(() => void this.refresh().catch(() => {}), Math.max(50, this.checkMs / 2));
      this.timer.unref();
    }
    return this;
  }

  stop(): void {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
  }

  private refresh(): Promise<void> {
    this.refreshing ??= listLatestSummaryVersions(this.db)
      .then((m) => {
        this.latest = m;
        this.checkedAt = Date.now();
        this.readAt = this.checkedAt;
      })
      .finally(() => (this.refreshing = null));
    return this.refreshing;
  }

  /**
   * Region → latest version (null: the region exists but has no snapshot yet); at most `checkMs` old.
   * While the database does not answer, what was read last is used for up to STALE_IF_ERROR_MS.
   */
  async heads(): Promise<ReadonlyMap<string, number | null>> {
    if (Date.now() - this.checkedAt >= this.checkMs) {
      try {
        await this.refresh();
      } catch (err) {
        if (Date.now() - this.readAt > STALE_IF_ERROR_MS) throw err;
      }
    }
    return this.latest;
  }

  /** Forgets what it knows of the latest versions (after a write in this process). */
  invalidate(): void {
    this.checkedAt = -Infinity;
  }

  async regionExists(region: string): Promise<boolean> {
    return (await this.heads()).has(region);
  }

  /** The latest snapshot of a region, or a given version; null when there is none. */
  async get(region: string, version?: number): Promise<CachedSnapshot | null> {
    const v = version ?? (await this.heads()).get(region);
    if (v === null || v === undefined) return null;
    const key = `${region}\u0000${v}`;
    let entry = this.entries.get(key);
    if (entry) {
      this.entries.delete(key); // re-insert: most recently used last
      this.entries.set(key, entry);
      return entry;
    }
    entry = this.load(region, v);
    this.entries.set(key, entry);
    entry.then((e) => e === null && this.entries.delete(key)).catch(() => this.entries.delete(key));
    while (this.entries.size > this.maxEntries) this.entries.delete(this.entries.keys().next().value as string);
    return entry;
  }

  private async load(region: string, version: number): Promise<CachedSnapshot | null> {
    const row = await getSummarySnapshot(this.db, region, version);
    if (!row) return null;
    const snapshot: Snapshot = { region, version: row.version, etag: row.etag, createdAt: row.createdAt, payload: row.payload as SnapshotPayload };
    return { snapshot, json: Buffer.from(summaryJson(snapshot)), csv: Buffer.from(summaryCsv(snapshot)) };
  }
}
