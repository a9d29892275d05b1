import { tableReaders, PLOT_COLUMNS } from '../rules/columns';
import { INVALID } from '../rules/field-checks';
import { CROSS, crossMessages, PLAUSIBILITY, plausibilityMessages, ROW, rowMessages } from '@stemwise/core';
import { readTable, type TableSource, type TableStats } from '../read/table';
import { tableOptions, type ValidationContext } from './context';

/**
 * A plot of the batch (one visit) or a stored plot that stems of the batch attach to. A plot whose row
 * has an error is kept (stems naming it are refused by name), with NaN or '' where its cell was invalid.
 */
export interface PlotEntry {
  key: string;
  /** False for a stored plot referenced by trees only. */
  inBatch: boolean;
  /** Loadable: its own row has no error (always true for a stored plot). */
  ok: boolean;
  line: number;
  region: string;
  forestType: string;
  latitude: number;
  longitude: number;
  elevationM: number | null;
  areaHa: number;
  dbhMinCm: number;
  subplotAreaHa: number;
  subplotDbhMinCm: number;
  surveyDate: string;
  loggingClass: number;
  fireClass: number;
  /** Visit the stems go to (set when the load creates it, or the stored plot's latest visit). */
  visitId: number;
  /** Stem rows naming this plot, and how many of them have dbh_cm above the millimetre bound. */
  stems: number;
  stemsOverMm: number;
}

const { cell } = tableReaders(PLOT_COLUMNS);
const numberOr = (v: number | typeof INVALID): number => (v === INVALID ? NaN : v);
const orNull = (v: number | null | typeof INVALID): number | null => (v === INVALID ? null : v);
const textOr = (v: string | typeof INVALID): string => (v === INVALID ? '' : v);

export interface PlotsResult {
  plots: Map<string, PlotEntry>;
  stats: TableStats;
}

/** Reads plots.csv: field rules, subplot area, duplicate plot ids, shared coordinates, early dates. */
export async function validatePlots(ctx: ValidationContext, src: TableSource): Promise<PlotsResult> {
  const { log } = ctx;
  const stats: TableStats = { rows: 0, badRows: 0, fatal: false };
  const plots = new Map<string, PlotEntry>();
  const atCoordinates = new Map<string, string>();
  const early = `${ctx.plausibility.earlyYear}-01-01`;
  const rows = readTable(src, tableOptions(ctx, PLOT_COLUMNS, true), stats);
  for await (const batch of rows) {
    for (const { values: v, line, ok: fieldsOk } of batch) {
      ctx.progress.rowsChecked++;
      let ok = fieldsOk;
      const bad = () => {
        if (ok) stats.badRows++;
        ok = false;
      };
      const key = cell.plot_id(v);
      const latitude = cell.latitude(v);
      const longitude = cell.longitude(v);
      const areaHa = cell.area_ha(v);
      const subplotAreaHa = cell.subplot_area_ha(v);
      const surveyDate = cell.survey_date(v);
      if (typeof subplotAreaHa === 'number' && typeof areaHa === 'number' && subplotAreaHa >= areaHa) {
        log.add(ROW.subplotAreaTooLarge, src.file, line, 'subplot_area_ha', String(subplotAreaHa), rowMessages.subplotAreaTooLarge(subplotAreaHa, areaHa));
        bad();
      }
      if (typeof surveyDate === 'string' && surveyDate < early) {
        log.add(PLAUSIBILITY.surveyDateEarly, src.file, line, 'survey_date', surveyDate, plausibilityMessages.surveyDateEarly(surveyDate, ctx.plausibility.earlyYear));
      }
      if (typeof key !== 'string') continue;
      const first = plots.get(key);
      if (first) {
        log.add(CROSS.duplicatePlot, src.file, line, 'plot_id', key, crossMessages.duplicatePlot(key, first.line));
        bad();
        continue;
      }
      if (typeof latitude === 'number' && typeof longitude === 'number') {
        const at = `${latitude},${longitude}`;
        const other = atCoordinates.get(at);
        if (other !== undefined) log.add(PLAUSIBILITY.sameCoordinates, src.file, line, 'latitude', at, plausibilityMessages.sameCoordinates(key, other));
        else atCoordinates.set(at, key);
      }
      plots.set(key, {
        key,
        inBatch: true,
        ok,
        line,
        region: textOr(cell.region(v)),
        forestType: textOr(cell.forest_type(v)),
        latitude: numberOr(latitude),
        longitude: numberOr(longitude),
        elevationM: orNull(cell.elevation_m(v)),
        areaHa: numberOr(areaHa),
        dbhMinCm: numberOr(cell.dbh_min_cm(v)),
        subplotAreaHa: numberOr(subplotAreaHa),
        subplotDbhMinCm: numberOr(cell.subplot_dbh_min_cm(v)),
        surveyDate: textOr(surveyDate),
        loggingClass: numberOr(cell.logging_class(v)),
        fireClass: numberOr(cell.fire_class(v)),
        visitId: 0,
        stems: 0,
        stemsOverMm: 0,
      });
    }
    ctx.tick();
  }
  return { plots, stats };
}
