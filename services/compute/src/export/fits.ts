import { countStaleVisits, forestTypesWithPlots, listCurveFits, listStale } from '@stemwise/db';
import { checkFitColumn, encodeTable, FIT_COLUMNS, fitLeftOut, fitRows, toFitRow, writeExport, type ExportTarget, type FitRow, type ServiceDeps } from '@stemwise/core';
import type { Logger } from '@stemwise/platform';
import { fitForestType, storeFits } from '../fits';

export const FIT_EXPORT_FORMATS = ['csv', 'json'] as const;
export type FitExportFormat = (typeof FIT_EXPORT_FORMATS)[number];

export interface ExportFitsOptions {
  format: FitExportFormat;
  /** Any numeric `export plots` column; default config.fitAxis. */
  axis?: string | null;
  /** Any numeric `export plots` column; default config.fitMetric. */
  metric?: string | null;
}

export interface FitsExportSummary {
  rows: number;
  /** true when the rows are the stored fits of the configured metric and axis (refreshed where stale). */
  stored: boolean;
  staleVisits: number;
}

/**
 * The `export fits` rows, two per forest type with plots (linear, quadratic). For the configured
 * metric and axis these are the stored fits, refitted first where stale or missing; for any other
 * pair they are computed on demand and not stored.
 */
export async function fitExportRows(deps: Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger }, options: Omit<ExportFitsOptions, 'format'> = {}): Promise<{ rows: FitRow[]; stored: boolean }> {
  const { db, config } = deps;
  const axis = checkFitColumn('axis', options.axis ?? config.fitAxis);
  const metric = checkFitColumn('metric', options.metric ?? config.fitMetric);
  const types = await forestTypesWithPlots(db);
  if (axis === config.fitAxis && metric === config.fitMetric) {
    const have = new Set((await listCurveFits(db, { scope: { kind: 'forest_type' }, metric, axis })).map((r) => r.forestType));
    const stale = new Set(await listStale(db, 'fits'));
    const due = types.filter((t) => stale.has(t) || !have.has(t));
    if (due.length) await storeFits(deps, due);
    const stored = await listCurveFits(db, { scope: { kind: 'forest_type' }, metric, axis, forestTypes: types });
    return { rows: stored.map(toFitRow), stored: true };
  }
  const rows: FitRow[] = [];
  for (const forestType of types) {
    const fits = await fitForestType(db, forestType, { metric, axis, bootstrap: config.bootstrap, seed: config.seed }, { regions: false });
    rows.push(...fitRows(fits.all, { forestType, metric, axis }, fitLeftOut(fits.leftOut)));
  }
  return { rows, stored: false };
}

/** Writes `export fits` as CSV or JSON. */
export async function exportFits(deps: Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger }, options: ExportFitsOptions, target: ExportTarget): Promise<FitsExportSummary> {
  const { rows, stored } = await fitExportRows(deps, options);
  await writeExport(encodeTable(options.format, FIT_COLUMNS, rows), target);
  return { rows: rows.length, stored, staleVisits: await countStaleVisits(deps.db) };
}
