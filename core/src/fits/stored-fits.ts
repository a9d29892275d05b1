// Curve fits as stored rows and `export fits` rows, and the points a fit is made from: shared by the
// fits job (compute), the fits export and the report's fit tables and charts.
import { WHOLE_FOREST_TYPE_SCOPE, type CurveFitRow, type FitScope, type LatestPlotMetrics, type PlotMetricDbColumn } from '@stemwise/db';
import { verdictEvidence, type CurvePoint, type CurveResult, type CurveTests, type FitLeftOut, type FitRow, type PeakEstimate } from '../science/verdict';
import { countLeftOut, leftOutText, leftOutTotal } from './left-out';

/** Points (x = axis, y = metric) of the latest visit of each plot, where both are known, with the plot's key. */
export function pointsOf(plots: readonly LatestPlotMetrics[], axis: string, metric: string): Array<CurvePoint & { region: string; plot: string }> {
  const out: Array<CurvePoint & { region: string; plot: string }> = [];
  for (const p of plots) {
    const x = p.metrics[axis as PlotMetricDbColumn];
    const y = p.metrics[metric as PlotMetricDbColumn];
    if (x !== null && y !== null && Number.isFinite(x) && Number.isFinite(y)) out.push({ x, y, region: p.region, plot: p.plotKey });
  }
  return out;
}

/** Counts per reason of the plots without the axis or the metric (details.left_out of a stored fit). */
export function leftOutOf(plots: readonly Pick<LatestPlotMetrics, 'metrics'>[], axis: string, metric: string): Record<string, number> {
  return countLeftOut(plots.map((p) => p.metrics), [metric, axis]);
}

/** The `plots_left_out` and `left_out_reasons` cells of counts per reason. */
export function fitLeftOut(counts: Readonly<Record<string, number>> | null | undefined): FitLeftOut {
  return { total: leftOutTotal(counts), reasons: leftOutText(counts) };
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
    ...leftOutCells(r.details),
    ...(r.model === 'quadratic' ? verdictEvidence(r.details.tests as CurveTests | undefined, r.details.peak as PeakEstimate | undefined) : verdictEvidence(null, null)),
  };
}

function leftOutCells(details: Record<string, unknown>): Pick<FitRow, 'plots_left_out' | 'left_out_reasons'> {
  const { total, reasons } = fitLeftOut(details.left_out as Record<string, number> | undefined);
  return { plots_left_out: total, left_out_reasons: reasons };
}
