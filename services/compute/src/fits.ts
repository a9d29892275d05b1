import {
  clearProblems,
  clearStale,
  deleteCurveFitsExcept,
  listLatestPlotMetrics,
  listStale,
  listStaleMarks,
  markStale,
  problemSubject,
  recordProblems,
  regionsOfForestTypes,
  upsertCurveFits,
  WHOLE_FOREST_TYPE_SCOPE,
  type CurveFitRow,
  type Db,
  type FitScope,
  type LatestPlotMetrics,
  type PlotMetricDbColumn,
  type ServiceDeps,
} from '@stemwise/db';
import { isInfrastructureError, PermanentError, type Logger } from '@stemwise/platform';
import { renderFitChartSvg } from './charts/fit-chart';
import { FITTABLE_COLUMNS } from './fit-columns';
import { fitCurves, fitRows, type CurvePoint, type CurveResult, type FitRow } from './science/verdict';

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
}

/** Points (x = axis, y = metric) of the latest visit of each plot, where both are known. */
export function pointsOf(plots: readonly LatestPlotMetrics[], axis: string, metric: string): Array<CurvePoint & { region: string }> {
  const out: Array<CurvePoint & { region: string }> = [];
  for (const p of plots) {
    const x = p.metrics[axis as PlotMetricDbColumn];
    const y = p.metrics[metric as PlotMetricDbColumn];
    if (x !== null && y !== null && Number.isFinite(x) && Number.isFinite(y)) out.push({ x, y, region: p.region });
  }
  return out;
}

/** Fits of one forest type: as a whole, and per region with enough plots. */
export async function fitForestType(db: Pick<Db, 'query'>, forestType: string, settings: FitSettings, options: { regions: boolean }): Promise<ForestTypeFits> {
  for (const c of [settings.metric, settings.axis]) {
    if (!FITTABLE_COLUMNS.includes(c)) throw new PermanentError('fit_column_unknown', `cannot fit on '${c}': not a numeric column of export plots`);
  }
  const plots = await listLatestPlotMetrics(db, forestType);
  return fitPoints(forestType, pointsOf(plots, settings.axis, settings.metric), settings, options);
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

/** What is kept of a result beside the columns: the reasons, the tests, the intervals. */
export function fitDetails(result: CurveResult): Record<string, unknown> {
  const strip = (m: CurveResult['linear']) => (m ? { ...m, fit: undefined } : null);
  return {
    alpha: result.alpha,
    xMin: result.xMin,
    xMax: result.xMax,
    reasons: result.reasons,
    untestable: result.untestable,
    peak: result.peak,
    tests: result.tests,
    linear: strip(result.linear),
    quadratic: strip(result.quadratic),
  };
}

/** A stored row from an `export fits` row. */
export function toStoredRow(scope: FitScope, row: FitRow, details: Record<string, unknown>): CurveFitRow {
  const n = (v: string | number | null) => (typeof v === 'number' ? v : null);
  return {
    scopeKind: scope.kind,
    scope: scope.kind === 'region' ? scope.region : WHOLE_FOREST_TYPE_SCOPE,
    forestType: String(row.forest_type),
    metric: String(row.metric),
    axis: String(row.axis),
    model: row.model as CurveFitRow['model'],
    n: Number(row.n),
    b0: n(row.b0),
    b1: n(row.b1),
    b2: n(row.b2),
    seB0: n(row.se_b0),
    seB1: n(row.se_b1),
    seB2: n(row.se_b2),
    pB1: n(row.p_b1),
    pB2: n(row.p_b2),
    r2: n(row.r2),
    adjR2: n(row.adj_r2),
    aicc: n(row.aicc),
    peakX: n(row.peak_x),
    peakCiLow: n(row.peak_ci_low),
    peakCiHigh: n(row.peak_ci_high),
    verdict: String(row.verdict),
    details,
  };
}

/** An `export fits` row from a stored one. */
export function toFitRow(r: CurveFitRow): FitRow {
  return {
    forest_type: r.forestType,
    metric: r.metric,
    axis: r.axis,
    n: r.n,
    model: r.model,
    b0: r.b0,
    b1: r.b1,
    b2: r.b2,
    se_b0: r.seB0,
    se_b1: r.seB1,
    se_b2: r.seB2,
    p_b1: r.pB1,
    p_b2: r.pB2,
    r2: r.r2,
    adj_r2: r.adjR2,
    aicc: r.aicc,
    peak_x: r.peakX,
    peak_ci_low: r.peakCiLow,
    peak_ci_high: r.peakCiHigh,
    verdict: r.verdict,
  };
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
 * forest type (scope kind `forest_type`, with the chart SVG in details.chart_svg) and per region with
 * enough plots; clears the types' `fits` marks and marks the summaries of their regions stale — per
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
    const rows: CurveFitRow[] = [];
    try {
      fits = fitPoints(forestType, pointsOf(plots, settings.axis, settings.metric), settings, { regions: true });
      const chart = await chartFor(fits, settings, deps.log);
      for (const row of fitRows(fits.all, labels)) rows.push(toStoredRow({ kind: 'forest_type' }, row, { ...fitDetails(fits.all), ...chart }));
      for (const r of fits.regions) for (const row of fitRows(r.result, labels)) rows.push(toStoredRow({ kind: 'region', region: r.region }, row, fitDetails(r.result)));
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
    await db.transaction(async (tx) => {
      await deleteCurveFitsExcept(tx, forestType, settings.metric, settings.axis, { whole: regions.length > 0, regions: [...fits.regions, ...fits.failedRegions].map((r) => r.region) });
      if (regions.length) await upsertCurveFits(tx, rows);
      const fitted = [{ region: null }, ...fits.regions].map((r) => problemSubject({ stage: 'fit', forestType, region: r.region, visitId: null }));
      await clearProblems(tx, 'fit', fitted);
      await recordProblems(tx, runId, fits.failedRegions.map((f) => ({ stage: 'fit' as const, forestType, region: f.region, visitId: null, plotKey: null, reason: f.reason })));
      await clearStale(tx, 'fits', marks);
      await markStale(tx, 'summary', regions);
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
