import { csvHeader, csvLine, REGION_COLUMNS, type Row } from '@stemwise/core';
import type { NationalSnapshot } from './national-snapshot';
import type { Snapshot } from './snapshot-payload';

// The forms a snapshot is served in: JSON (everything but the chart SVGs) and CSV (the `export
// regions` rows). Built once per (region, version) and cached: snapshots never change.

export function summaryJson(s: Snapshot): string {
  const { charts: _charts, ...rest } = s.payload;
  return JSON.stringify({
    region: s.region,
    version: s.version,
    created_at: s.createdAt.toISOString(),
    etag: s.etag,
    data: rest.data,
    method: rest.method,
    summary: rest.summary,
    fits: rest.fits,
    ...(rest.change === undefined ? {} : { change: rest.change }),
  });
}

/** The `export regions` rows of a snapshot as CSV (spec columns, safe for spreadsheets). */
export function summaryCsv(s: Snapshot | NationalSnapshot): string {
  let out = csvHeader(REGION_COLUMNS);
  for (const row of s.payload.summary.rows) out += csvLine(REGION_COLUMNS, row as unknown as Row);
  return out;
}

/** The national snapshot as JSON (everything but the chart SVG). */
export function nationalJson(s: NationalSnapshot): string {
  const { data, method, summary, sources, change } = s.payload;
  return JSON.stringify({ region: 'national', version: s.version, created_at: s.createdAt.toISOString(), etag: s.etag, data, method, summary, sources, ...(change === undefined ? {} : { change }) });
}
