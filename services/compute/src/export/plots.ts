import { countStaleVisits, listRegionNames, pagePlotExport, regionExists, type Queryable } from '@stemwise/db';
import { StemwiseError } from '@stemwise/platform';
import { encodeFeatureCollection, encodeTable, PLOT_METRICS, writeExport, type ExportTarget, type Row } from '@stemwise/core';

/** The columns of `export plots`, in the order of docs/exports.md. */
export const PLOT_EXPORT_COLUMNS: readonly string[] = ['plot_id', 'survey_date', 'region', 'forest_type', ...PLOT_METRICS.map((m) => m.column)];

export const PLOT_EXPORT_FORMATS = ['csv', 'json', 'geojson'] as const;
export type PlotExportFormat = (typeof PLOT_EXPORT_FORMATS)[number];

/** Rows fetched per query: pages keep memory flat however many visits there are. */
export const PLOT_EXPORT_PAGE = 2000;

export interface PlotExportItem {
  row: Row;
  longitude: number;
  latitude: number;
}

/** Every plot visit (of a region, or all), by plot_id then survey date, read page by page. */
export async function* plotExportItems(db: Queryable, options: { region?: string | null; pageSize?: number } = {}): AsyncGenerator<PlotExportItem> {
  const limit = options.pageSize ?? PLOT_EXPORT_PAGE;
  let after: { plotId: string; surveyDate: string } | null = null;
  for (;;) {
    const page = await pagePlotExport(db, { region: options.region ?? null, after, limit });
    for (const r of page) {
      const row: Record<string, string | number | null> = { plot_id: r.plot_id, survey_date: r.survey_date, region: r.region, forest_type: r.forest_type };
      for (const [column, value] of Object.entries(r.metrics)) row[column] = value;
      yield { row, longitude: r.longitude, latitude: r.latitude };
    }
    if (page.length < limit) return;
    const last = page[page.length - 1];
    after = { plotId: last.plot_id, surveyDate: last.survey_date };
  }
}

export interface ExportPlotsOptions {
  format: PlotExportFormat;
  /** Only the plots of this region (by name). */
  region?: string | null;
  pageSize?: number;
}

export interface ExportSummary {
  rows: number;
  /** Plot visits whose metrics are due (their rows show the last computed values, or empty cells). */
  staleVisits: number;
}

/** Refuses a region filter that names no stored region, listing the known ones. */
export async function checkExportRegion(db: Queryable, region: string | null): Promise<void> {
  if (region !== null && !(await regionExists(db, region))) {
    const known = await listRegionNames(db);
    throw new StemwiseError('not_found', `no region named '${region}' (known: ${known.length ? known.join(', ') : 'none yet'})`);
  }
}

/** Writes located rows as CSV, JSON (array of objects) or GeoJSON (RFC 7946 FeatureCollection); returns the rows written. */
export async function writeItems(format: PlotExportFormat, columns: readonly string[], source: AsyncIterable<PlotExportItem>, target: ExportTarget): Promise<number> {
  let rows = 0;
  const items = (async function* () {
    for await (const item of source) {
      rows++;
      yield item;
    }
  })();
  const pieces =
    format === 'geojson'
      ? encodeFeatureCollection(columns, items)
      : encodeTable(format, columns, (async function* () {
          for await (const item of items) yield item.row;
        })());
  await writeExport(pieces, target);
  return rows;
}

/** Writes `export plots` as CSV, JSON (array of objects) or GeoJSON (RFC 7946 FeatureCollection). */
export async function exportPlots(db: Queryable, options: ExportPlotsOptions, target: ExportTarget): Promise<ExportSummary> {
  const region = options.region ?? null;
  await checkExportRegion(db, region);
  const rows = await writeItems(options.format, PLOT_EXPORT_COLUMNS, plotExportItems(db, { region, pageSize: options.pageSize }), target);
  return { rows, staleVisits: await countStaleVisits(db, region) };
}
