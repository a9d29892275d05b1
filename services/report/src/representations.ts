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
    carbon_uncertainty: rest.carbon_uncertainty ?? null,
    tree_carbon_uncertainty: rest.tree_carbon_uncertainty ?? null,
    carbon_change_uncertainty: rest.carbon_change_uncertainty ?? null,
    tree_carbon_change_uncertainty: rest.tree_carbon_change_uncertainty ?? null,
    ...(rest.change === undefined ? {} : { change: rest.change }),
    biomass_method: rest.biomass_method ?? null,
    plot_sizes: rest.plot_sizes ?? null,
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
  const { data, method, summary, sources, change, biomass_method } = s.payload;
  const carbon_uncertainty = s.payload.carbon_uncertainty ?? null;
  const tree_carbon_uncertainty = s.payload.tree_carbon_uncertainty ?? null;
  const carbon_change_uncertainty = s.payload.carbon_change_uncertainty ?? null;
  const tree_carbon_change_uncertainty = s.payload.tree_carbon_change_uncertainty ?? null;
  return JSON.stringify({ region: 'national', version: s.version, created_at: s.createdAt.toISOString(), etag: s.etag, data, method, summary, sources, ...(change === undefined ? {} : { change }), biomass_method: biomass_method ?? null, carbon_uncertainty, tree_carbon_uncertainty, carbon_change_uncertainty, tree_carbon_change_uncertainty });
}
