import { getSummaryPair, type Queryable } from '@stemwise/db';
import type { SnapshotPayload } from './snapshot-payload';
import { summaryChanges, type SummaryChanges } from './summary/summary-changes';

/** What changed from the version before to the given (default latest) version of a region's summary; null when there is no such version. */
export async function readSummaryChanges(db: Queryable, region: string, version?: number): Promise<SummaryChanges | null> {
  const [current, previous] = await getSummaryPair(db, region, version);
  if (!current || (version !== undefined && current.version !== version)) return null;
  const side = (s: NonNullable<typeof current>) => ({ version: s.version, rows: (s.payload as SnapshotPayload).summary.rows, plotKeys: s.plotKeys });
  return summaryChanges(side(current), previous ? side(previous) : null);
}
