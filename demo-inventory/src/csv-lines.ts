// CSV lines of the inventory batch format, version 1 (docs/upload-format.md).

import type { PlotRow, TreeStem } from './plot-generator';
import { REGIONS } from './scenario';

export const PLOT_COLUMNS = [
  'plot_id', 'region', 'forest_type', 'latitude', 'longitude', 'area_ha', 'dbh_min_cm', 'subplot_area_ha',
  'subplot_dbh_min_cm', 'survey_date', 'logging_class', 'fire_class', 'elevation_m',
] as const;
export type PlotColumn = (typeof PLOT_COLUMNS)[number];

export const TREE_COLUMNS = [
  'plot_id', 'tree_id', 'species', 'dbh_cm', 'height_m', 'status', 'stump_cause', 'fire_damage', 'in_subplot',
] as const;
export type TreeColumn = (typeof TREE_COLUMNS)[number];

export const STRATA_COLUMNS = ['region', 'forest_type', 'forest_area_ha'] as const;

/** A CSV field, quoted (RFC 4180) only when it holds a comma, a quote or a line break. */
export function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

/** A line (no line break) from named cells in the given column order; missing cells are empty. */
export function csvLine<C extends string>(columns: readonly C[], cells: Partial<Record<C, string>>): string {
  return columns.map((c) => csvField(cells[c] ?? '')).join(',');
}

export function plotCells(row: PlotRow): Record<PlotColumn, string> {
  return {
    plot_id: row.plotId,
    region: row.region,
    forest_type: row.forestType,
    latitude: String(row.latitude),
    longitude: String(row.longitude),
    area_ha: String(row.areaHa),
    dbh_min_cm: String(row.dbhMinCm),
    subplot_area_ha: String(row.subplotAreaHa),
    subplot_dbh_min_cm: String(row.subplotDbhMinCm),
    survey_date: row.surveyDate,
    logging_class: String(row.loggingClass),
    fire_class: String(row.fireClass),
    elevation_m: String(row.elevationM),
  };
}

export function plotLine(row: PlotRow): string {
  return csvLine(PLOT_COLUMNS, plotCells(row));
}

export function treeCells(plotId: string, s: TreeStem): Record<TreeColumn, string> {
  return {
    plot_id: plotId,
    tree_id: s.treeId,
    species: s.species,
    dbh_cm: s.dbhCm.toFixed(1),
    height_m: s.heightM === null ? '' : s.heightM.toFixed(1),
    status: s.status,
    stump_cause: s.stumpCause ?? '',
    fire_damage: String(s.fireDamage),
    in_subplot: s.inSubplot ? '1' : '0',
  };
}

/**
 * The same line as `csvLine(TREE_COLUMNS, treeCells(…))`, built without the intermediate object:
 * this runs for millions of stems. Generated names and ids hold no comma, quote or line break.
 */
export function treeLine(plotId: string, s: TreeStem): string {
  const height = s.heightM === null ? '' : s.heightM.toFixed(1);
  return `${plotId},${s.treeId},${s.species},${s.dbhCm.toFixed(1)},${height},${s.status},${s.stumpCause ?? ''},${s.fireDamage},${s.inSubplot ? 1 : 0}`;
}

/** strata.csv lines (header first): every region × forest type with forest. */
export function strataLines(): string[] {
  const lines: string[] = [STRATA_COLUMNS.join(',')];
  for (const r of REGIONS) {
    for (const [type, area] of Object.entries(r.forestAreaHa)) {
      if (area > 0) lines.push(csvLine(STRATA_COLUMNS, { region: r.name, forest_type: type, forest_area_ha: String(area) }));
    }
  }
  return lines;
}
