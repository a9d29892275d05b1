import { getSummarySnapshot, listLatestSummaryVersions, type Queryable } from '@stemwise/db';
import type { Snapshot, SnapshotPayload } from './snapshot-payload';
import { summaryCsv, summaryJson } from './representations';

export interface CachedSnapshot {
  readonly snapshot: Snapshot;
  readonly json: Buffer;
  readonly csv: Buffer;
}

/**
 * Snapshots in memory, keyed by (region, version): a version never changes once stored, so an entry
 * never goes stale; only "which version is the latest" does, and that is read with one cheap query at
 * most every `checkMs` (default 1 s) for all regions at once. Entries are evicted least-recently used.
 */
export class SummaryCache {
  private latest: Map<string, number | null> = new Map();
  private checkedAt = -Infinity;
  private refreshing: Promise<void> | null = null;
  private readonly entries = new Map<string, Promise<CachedSnapshot | null>>();

  constructor(
    private readonly db: Queryable,
    private readonly checkMs = 1000,
    private readonly maxEntries = 256,
  ) {}

  /** Region → latest version (null: the region exists but has no snapshot yet); at most `checkMs` old. */
  async heads(): Promise<ReadonlyMap<string, number | null>> {
    if (Date.now() - this.checkedAt >= this.checkMs) {
      this.refreshing ??= listLatestSummaryVersions(this.db)
        .then((m) => {
          this.latest = m;
          this.checkedAt = Date.now();
        })
        .finally(() => (this.refreshing = null));
      await this.refreshing;
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
