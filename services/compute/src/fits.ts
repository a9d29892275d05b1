import {
  clearProblems,
  clearStale,
  deleteCurveFitsExcept,
  deleteFitChart,
  getWholeTypeVerdict,
  listLatestPlotMetrics,
  listStale,
  listStaleMarks,
  markStale,
  problemSubject,
  recordProblems,
  regionsOfForestTypes,
  upsertCurveFits,
  upsertFitChart,
  WHOLE_FOREST_TYPE_SCOPE,
  type CurveFitRow,
  type Db,
  type FitScope,
  type LatestPlotMetrics,
  type PlotMetricDbColumn,
} from '@stemwise/db';
import { isInfrastructureError, PermanentError, type Logger } from '@stemwise/platform';
import {
  FITTABLE_COLUMNS,
  fitChartData,
  fitChartPoints,
  fitCurves,
  fitDetails,
  fitRows,
  fitLeftOut,
  leftOutOf,
  pointsOf,
  toStoredRow,
  type CurvePoint,
  type CurveResult,
  type ServiceDeps,
  type StoredFitChart,
} from '@stemwise/core';

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
  /** Regions whose fit threw (the others are fitted all the same), with the reason. */
  failedRegions: Array<{ region: string; reason: string }>;
  /** Plots of the forest type without the metric or the axis, counted per reason (left out of every fit). */
  leftOut?: Record<string, number>;
}

/** Fits of one forest type: as a whole, and per region with enough plots. */
export async function fitForestType(db: Pick<Db, 'query'>, forestType: string, settings: FitSettings, options: { regions: boolean }): Promise<ForestTypeFits> {
  for (const c of [settings.metric, settings.axis]) {
    if (!FITTABLE_COLUMNS.includes(c)) throw new PermanentError('fit_column_unknown', `cannot fit on '${c}': not a numeric column of export plots`);
  }
  const plots = await listLatestPlotMetrics(db, forestType);
  return { ...fitPoints(forestType, pointsOf(plots, settings.axis, settings.metric), settings, options), leftOut: leftOutOf(plots, settings.axis, settings.metric) };
}

/**
 * The fits of one forest type's points (no I/O). A region whose fit throws is set aside in
 * `failedRegions` and the other regions are fitted; a throw of the whole-type fit propagates.
 */
export function fitPoints(forestType: string, points: ReadonlyArray<CurvePoint & { region: string }>, settings: FitSettings, options: { regions: boolean }): ForestTypeFits {
  const curveOptions = { bootstrapN: settings.bootstrap, seed: settings.seed };
  const all = fitCurves(points.map(({ x, y }) => ({ x, y })), curveOptions);
  const regions: ForestTypeFits['regions'] = [];
  const failedRegions: ForestTypeFits['failedRegions'] = [];
  if (options.regions) {
    const byRegion = new Map<string, CurvePoint[]>();
    for (const p of points) {
      const list = byRegion.get(p.region) ?? [];
      list.push({ x: p.x, y: p.y });
      byRegion.set(p.region, list);
    }
    for (const [region, list] of [...byRegion].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
      if (list.length < MIN_REGION_PLOTS) continue;
      try {
        regions.push({ region, points: list, result: fitCurves(list, curveOptions) });
      } catch (err) {
        failedRegions.push({ region, reason: (err as Error).message });
      }
    }
  }
  return { forestType, points: points.map(({ x, y }) => ({ x, y })), all, regions, failedRegions };
}

export interface StoredFits {
  forestType: string;
  n: number;
  verdict: string;
  regions: number;
  /** Set when the forest type (or some of its regions) could not be fitted; see compute_problems. */
  problems?: string[];
}

/**
 * Fits the given forest types with the configured metric and axis and stores them: rows for the whole
 * forest type (scope kind `forest_type`) and per region with enough plots, and what the charts show
 * (fit_charts: the points with their region, the curve, the turning point), so the report draws them
 * when a page is served without fitting again (no chart is drawn here); clears the types' `fits` marks and, when a type's verdict changed, marks the summaries of its regions stale — per
 * forest type, in one transaction. A forest type or region whose fit throws is recorded in
 * compute_problems (with `runId`), logged, and its mark cleared so no run retries it until its data
 * change; the other forest types are fitted all the same. Read and write errors still fail the job.
 */
export async function storeFits(deps: Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger; runId?: string }, forestTypes: readonly string[]): Promise<StoredFits[]> {
  const { db, config } = deps;
  const runId = deps.runId ?? 'export';
  const settings: FitSettings = { metric: config.fitMetric, axis: config.fitAxis, bootstrap: config.bootstrap, seed: config.seed };
  const out: StoredFits[] = [];
  for (const forestType of forestTypes) {
    const marks = await listStaleMarks(db, 'fits', [forestType]); // before the inputs are read
    const plots = await listLatestPlotMetrics(db, forestType);
    const labels = { forestType, metric: settings.metric, axis: settings.axis };
    let fits: ForestTypeFits;
    let chart: StoredFitChart;
    const rows: CurveFitRow[] = [];
    try {
      const points = pointsOf(plots, settings.axis, settings.metric);
      fits = fitPoints(forestType, points, settings, { regions: true });
      chart = { ...fitChartData(fits.all), points: fitChartPoints(points) };
      const leftOut = (region?: string) => leftOutOf(region === undefined ? plots : plots.filter((p) => p.region === region), settings.axis, settings.metric);
      const all = leftOut();
      for (const row of fitRows(fits.all, labels, fitLeftOut(all))) rows.push(toStoredRow({ kind: 'forest_type' }, row, { ...fitDetails(fits.all), left_out: all }));
      for (const r of fits.regions) {
        const mine = leftOut(r.region);
        for (const row of fitRows(r.result, labels, fitLeftOut(mine))) rows.push(toStoredRow({ kind: 'region', region: r.region }, row, { ...fitDetails(r.result), left_out: mine }));
      }
    } catch (err) {
      if (isInfrastructureError(err)) throw err;
      // The science met data it cannot handle: keep the stored fits, say why, go on with the next type.
      const reason = (err as Error).message;
      deps.log?.error({ err, runId, forestType }, 'forest type could not be fitted; the others go on');
      await db.transaction(async (tx) => {
        await recordProblems(tx, runId, [{ stage: 'fit', forestType, region: null, visitId: null, plotKey: null, reason }]);
        await clearStale(tx, 'fits', marks);
      });
      out.push({ forestType, n: plots.length, verdict: 'not fitted', regions: 0, problems: [reason] });
      continue;
    }
    for (const f of fits.failedRegions) deps.log?.error({ runId, forestType, region: f.region, reason: f.reason }, 'region × forest type could not be fitted; the others go on');
    const regions = await regionsOfForestTypes(db, [forestType]);
    // The regions whose plots changed are marked by their chunks; the others keep their summary (and the
    // fit chart in it) unless the forest type's verdict changed (docs/methods.md#height-model-releases).
    const verdictChanged = (await getWholeTypeVerdict(db, forestType, settings.metric, settings.axis)) !== fits.all.verdict;
    await db.transaction(async (tx) => {
      await deleteCurveFitsExcept(tx, forestType, settings.metric, settings.axis, { whole: regions.length > 0, regions: [...fits.regions, ...fits.failedRegions].map((r) => r.region) });
      if (regions.length) {
        await upsertCurveFits(tx, rows);
        await upsertFitChart(tx, forestType, settings.metric, settings.axis, chart);
      } else await deleteFitChart(tx, forestType, settings.metric, settings.axis);
      const fitted = [{ region: null }, ...fits.regions].map((r) => problemSubject({ stage: 'fit', forestType, region: r.region, visitId: null }));
      await clearProblems(tx, 'fit', fitted);
      await recordProblems(tx, runId, fits.failedRegions.map((f) => ({ stage: 'fit' as const, forestType, region: f.region, visitId: null, plotKey: null, reason: f.reason })));
      await clearStale(tx, 'fits', marks);
      if (verdictChanged) await markStale(tx, 'summary', regions);
    });
    const problems = fits.failedRegions.map((f) => `${f.region}: ${f.reason}`);
    out.push({ forestType, n: fits.all.n, verdict: fits.all.verdict, regions: fits.regions.length, ...(problems.length ? { problems } : {}) });
  }
  return out;
}

/** The `compute.fits` stage: every forest type whose fits are marked stale. */
export async function refreshStaleFits(deps: Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger; runId?: string }): Promise<StoredFits[]> {
  return storeFits(deps, await listStale(deps.db, 'fits'));
}
