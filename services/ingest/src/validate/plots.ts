import { PLOT_COLUMNS } from '../rules/columns';
import { CROSS, crossMessages, PLAUSIBILITY, plausibilityMessages, ROW, rowMessages } from '@stemwise/core';
import { readTable, type TableSource, type TableStats } from '../read/table';
import { tableOptions, type ValidationContext } from './context';

/** A plot of the batch (one visit) or a stored plot that stems of the batch attach to. */
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
      const [key, region, forestType, latitude, longitude, areaHa, dbhMinCm, subplotAreaHa, subplotDbhMinCm, surveyDate, loggingClass, fireClass, elevationM] = v;
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
        region: region as string,
        forestType: forestType as string,
        latitude: latitude as number,
        longitude: longitude as number,
        elevationM: (elevationM as number | null) ?? null,
        areaHa: areaHa as number,
        dbhMinCm: dbhMinCm as number,
        subplotAreaHa: subplotAreaHa as number,
        subplotDbhMinCm: subplotDbhMinCm as number,
        surveyDate: surveyDate as string,
        loggingClass: loggingClass as number,
        fireClass: fireClass as number,
        visitId: 0,
        stems: 0,
        stemsOverMm: 0,
      });
    }
    ctx.tick();
  }
  return { plots, stats };
}
