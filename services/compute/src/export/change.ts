import { countStaleVisits, pagePlotChangeExport, PLOT_CHANGE_DB_COLUMNS, type Queryable } from '@stemwise/db';
import { type ExportTarget } from '@stemwise/core';
import { checkExportRegion, PLOT_EXPORT_PAGE, writeItems, type ExportSummary, type PlotExportFormat, type PlotExportItem } from './plots';

/** The columns of `export change`, in the order of docs/exports.md. */
export const CHANGE_EXPORT_COLUMNS: readonly string[] = ['plot_id', 'region', 'forest_type', 'date_from', 'date_to', ...PLOT_CHANGE_DB_COLUMNS.map(([c]) => c)];

/** Every stored pair of consecutive visits (of a region, or all), by plot_id then first date, read page by page. */
export async function* changeExportItems(db: Queryable, options: { region?: string | null; pageSize?: number } = {}): AsyncGenerator<PlotExportItem> {
  const limit = options.pageSize ?? PLOT_EXPORT_PAGE;
  let after: { plotId: string; dateFrom: string } | null = null;
  for (;;) {
    const page = await pagePlotChangeExport(db, { region: options.region ?? null, after, limit });
    for (const r of page) {
      const row: Record<string, string | number | null> = { plot_id: r.plot_id, region: r.region, forest_type: r.forest_type, date_from: r.date_from, date_to: r.date_to, ...r.values };
      yield { row, longitude: r.longitude, latitude: r.latitude };
    }
    if (page.length < limit) return;
    const last = page[page.length - 1];
    after = { plotId: last.plot_id, dateFrom: last.date_from };
  }
}

/**
 * Writes `export change` (one row per plot and pair of consecutive visits) as CSV, JSON or GeoJSON.
 * `staleVisits` counts visits whose figures are due: their plots' pairs are missing or out of date.
 */
export async function exportChange(db: Queryable, options: { format: PlotExportFormat; region?: string | null; pageSize?: number }, target: ExportTarget): Promise<ExportSummary> {
  const region = options.region ?? null;
  await checkExportRegion(db, region);
  const rows = await writeItems(options.format, CHANGE_EXPORT_COLUMNS, changeExportItems(db, { region, pageSize: options.pageSize }), target);
  return { rows, staleVisits: await countStaleVisits(db, region) };
}
