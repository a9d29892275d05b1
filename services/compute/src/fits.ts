import {
  clearStale,
  deleteCurveFitsExcept,
  listLatestPlotMetrics,
  listStale,
  listStaleMarks,
  markStale,
  regionsOfForestTypes,
  upsertCurveFits,
  type CurveFitRow,
  type Db,
} from '@stemwise/db';
import { PermanentError, type Logger } from '@stemwise/platform';
import { renderFitChartSvg } from '@stemwise/core/charts';
import { FITTABLE_COLUMNS, fitCurves, fitDetails, fitRows, pointsOf, toStoredRow, type CurvePoint, type CurveResult, type ServiceDeps } from '@stemwise/core';

/**
 * Fewest plots for a region × forest type fit (scope = region name): 30, stemwise's choice (common
 * practice for a regression with a quadratic term and its tests; below it the intervals are too wide
 * to read). Forest types as a whole (scope `all`) are always fitted; under 10 plots the verdict is `none`.
 */
export const MIN_REGION_PLOTS = 30;

export interface FitSettings {
  metric: string;
  axis: string;
  bootstrap: number;
  seed: number;
}

export interface ForestTypeFits {
  forestType: string;
  points: CurvePoint[];
  all: CurveResult;
  /** Region × forest type fits with at least MIN_REGION_PLOTS plots. */
  regions: Array<{ region: string; points: CurvePoint[]; result: CurveResult }>;
}

/** Fits of one forest type: as a whole, and per region with enough plots. */
export async function fitForestType(db: Pick<Db, 'query'>, forestType: string, settings: FitSettings, options: { regions: boolean }): Promise<ForestTypeFits> {
  for (const c of [settings.metric, settings.axis]) {
    if (!FITTABLE_COLUMNS.includes(c)) throw new PermanentError('fit_column_unknown', `cannot fit on '${c}': not a numeric column of export plots`);
  }
  const plots = await listLatestPlotMetrics(db, forestType);
  const points = pointsOf(plots, settings.axis, settings.metric);
  const curveOptions = { bootstrapN: settings.bootstrap, seed: settings.seed };
  const all = fitCurves(points.map(({ x, y }) => ({ x, y })), curveOptions);
  const regions: ForestTypeFits['regions'] = [];
  if (options.regions) {
    const byRegion = new Map<string, CurvePoint[]>();
    for (const p of points) {
      const list = byRegion.get(p.region) ?? [];
      list.push({ x: p.x, y: p.y });
      byRegion.set(p.region, list);
    }
    for (const [region, list] of [...byRegion].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
      if (list.length >= MIN_REGION_PLOTS) regions.push({ region, points: list, result: fitCurves(list, curveOptions) });
    }
  }
  return { forestType, points: points.map(({ x, y }) => ({ x, y })), all, regions };
}

async function chartFor(fits: ForestTypeFits, settings: FitSettings, log?: Logger): Promise<Record<string, unknown>> {
  try {
    const svg = await renderFitChartSvg({ forestType: fits.forestType, metric: settings.metric, axis: settings.axis, points: fits.points, fit: fits.all });
    return { chart_svg: svg };
  } catch (err) {
    // The numbers stand without their picture: keep them, say why the chart is missing.
    log?.error({ err, forestType: fits.forestType }, 'fit chart could not be rendered');
    return { chart_error: (err as Error).message };
  }
}

/**
 * Fits the given forest types with the configured metric and axis and stores them: rows for scope
 * `all` (with the chart SVG in details.chart_svg) and per region with enough plots; clears the types'
 * `fits` marks and marks the summaries of their regions stale — per forest type, in one transaction.
 */
export async function storeFits(deps: Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger }, forestTypes: readonly string[]): Promise<Array<{ forestType: string; n: number; verdict: string; regions: number }>> {
  const { db, config } = deps;
  const settings: FitSettings = { metric: config.fitMetric, axis: config.fitAxis, bootstrap: config.bootstrap, seed: config.seed };
  const out: Array<{ forestType: string; n: number; verdict: string; regions: number }> = [];
  for (const forestType of forestTypes) {
    const marks = await listStaleMarks(db, 'fits', [forestType]); // before the inputs are read
    const fits = await fitForestType(db, forestType, settings, { regions: true });
    const labels = { forestType, metric: settings.metric, axis: settings.axis };
    const rows: CurveFitRow[] = [];
    const chart = await chartFor(fits, settings, deps.log);
    for (const row of fitRows(fits.all, labels)) rows.push(toStoredRow('all', row, { ...fitDetails(fits.all), ...chart }));
    for (const r of fits.regions) for (const row of fitRows(r.result, labels)) rows.push(toStoredRow(r.region, row, fitDetails(r.result)));
    const regions = await regionsOfForestTypes(db, [forestType]);
    await db.transaction(async (tx) => {
      await deleteCurveFitsExcept(tx, forestType, settings.metric, settings.axis, regions.length ? ['all', ...fits.regions.map((r) => r.region)] : []);
      if (regions.length) await upsertCurveFits(tx, rows);
      await clearStale(tx, 'fits', marks);
      await markStale(tx, 'summary', regions);
    });
    out.push({ forestType, n: fits.all.n, verdict: fits.all.verdict, regions: fits.regions.length });
  }
  return out;
}

/** The `compute.fits` stage: every forest type whose fits are marked stale. */
export async function refreshStaleFits(deps: Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger }): Promise<Array<{ forestType: string; n: number; verdict: string; regions: number }>> {
  return storeFits(deps, await listStale(deps.db, 'fits'));
}
