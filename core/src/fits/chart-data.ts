// What a diversity–disturbance chart shows, worked out once by the fits job and stored beside the fit
// (table fit_charts), so that the report draws its charts from it without fitting again: the forest
// type's points with their region, the drawn model's curve and 95 % band, and the turning point with
// its interval. No I/O, no chart library (the SVG is drawn by @stemwise/core/charts).
import { predictPolynomial } from '../science/regression';
import { studentTQuantile } from '../science/student-t';
import type { CurveResult, ModelFit, Verdict } from '../science/verdict';

/** Number of x steps at which the curve and its band are evaluated (CURVE_STEPS + 1 positions). */
export const CURVE_STEPS = 120;

const BAND_LEVEL = 0.95;

/** The model drawn: the parabola when it has the lower AICc, else the straight line. */
export function chartModel(fit: CurveResult): ModelFit | null {
  if (fit.quadratic && (fit.tests.quadraticPreferred || !fit.linear)) return fit.quadratic;
  return fit.linear;
}

/** The drawn curve ŷ(x) and its band for the mean, column-wise (equal lengths; empty when no model). */
export interface FitChartCurve {
  readonly x: readonly number[];
  readonly y: readonly number[];
  readonly low: readonly number[];
  readonly high: readonly number[];
}

/** Everything a fit chart shows apart from the points. */
export interface FitChartData {
  readonly n: number;
  readonly alpha: number;
  readonly verdict: Verdict;
  /** The model drawn with its R²; null when neither model was fitted. */
  readonly model: { readonly name: 'linear' | 'quadratic'; readonly r2: number } | null;
  /** The turning point and its delta-method interval (hump or U only). */
  readonly peak: { readonly x: number; readonly ciLow: number; readonly ciHigh: number } | null;
  readonly curve: FitChartCurve;
}

/** A forest type's points, column-wise; `region[i]` indexes `regions` (stored compactly). */
export interface FitChartPoints {
  readonly regions: readonly string[];
  readonly x: readonly number[];
  readonly y: readonly number[];
  readonly region: readonly number[];
  /** The plot key of each point (absent in charts stored before plots were kept). */
  readonly plots?: readonly string[];
}

/** What fit_charts.chart holds for one forest type × metric × axis. */
export interface StoredFitChart extends FitChartData {
  readonly points: FitChartPoints;
}

// Curve ŷ(x) with the band ŷ ± t_{0.975, df}·SE(ŷ) for the mean (standard OLS prediction interval of the mean), on an even grid over the observed x range.
function curveOf(fit: CurveResult, model: ModelFit | null): FitChartCurve {
  const out = { x: [] as number[], y: [] as number[], low: [] as number[], high: [] as number[] };
  if (!model || fit.xMin === null || fit.xMax === null) return out;
  const t = studentTQuantile(1 - (1 - BAND_LEVEL) / 2, model.df);
  const span = fit.xMax - fit.xMin;
  for (let i = 0; i <= CURVE_STEPS; i++) {
    const x = fit.xMin + (span * i) / CURVE_STEPS;
    const { mean, se } = predictPolynomial(model.fit, x);
    out.x.push(x);
    out.y.push(mean);
    out.low.push(mean - t * se);
    out.high.push(mean + t * se);
  }
  return out;
}

/** The chart's view of a fit result. */
export function fitChartData(fit: CurveResult): FitChartData {
  const model = chartModel(fit);
  return {
    n: fit.n,
    alpha: fit.alpha,
    verdict: fit.verdict,
    model: model ? { name: model.model, r2: model.r2 } : null,
    peak: fit.peak ? { x: fit.peak.x, ciLow: fit.peak.ciLow, ciHigh: fit.peak.ciHigh } : null,
    curve: curveOf(fit, model),
  };
}

/** Points with their region (and plot key, when every point has one), stored column-wise with each region's name once (in order of first appearance). */
export function fitChartPoints(points: ReadonlyArray<{ x: number; y: number; region: string; plot?: string }>): FitChartPoints {
  const index = new Map<string, number>();
  const out: { regions: string[]; x: number[]; y: number[]; region: number[]; plots?: string[] } = { regions: [], x: [], y: [], region: [] };
  if (points.length && points.every((p) => p.plot !== undefined)) out.plots = points.map((p) => p.plot as string);
  for (const p of points) {
    let i = index.get(p.region);
    if (i === undefined) {
      index.set(p.region, (i = out.regions.length));
      out.regions.push(p.region);
    }
    out.x.push(p.x);
    out.y.push(p.y);
    out.region.push(i);
  }
  return out;
}

const isNumbers = (v: unknown, length?: number): v is number[] =>
  Array.isArray(v) && (length === undefined || v.length === length) && v.every((e) => typeof e === 'number');

/** A stored chart read back (fit_charts.chart), or null when it is not one (written by another version, damaged). */
export function asStoredFitChart(v: unknown): StoredFitChart | null {
  if (typeof v !== 'object' || v === null) return null;
  const c = v as Partial<Record<keyof StoredFitChart, unknown>>;
  const curve = c.curve as Partial<Record<keyof FitChartCurve, unknown>> | null | undefined;
  const points = c.points as Partial<Record<keyof FitChartPoints, unknown>> | null | undefined;
  if (typeof c.n !== 'number' || typeof c.alpha !== 'number' || typeof c.verdict !== 'string') return null;
  if (!curve || !isNumbers(curve.x) || ![curve.y, curve.low, curve.high].every((a) => isNumbers(a, (curve.x as number[]).length))) return null;
  if (!points || !isNumbers(points.x) || !isNumbers(points.y, points.x.length) || !isNumbers(points.region, points.x.length)) return null;
  if (!Array.isArray(points.regions) || !points.regions.every((r) => typeof r === 'string')) return null;
  if (points.plots !== undefined && !(Array.isArray(points.plots) && points.plots.length === points.x.length && points.plots.every((k) => typeof k === 'string'))) return null;
  return v as StoredFitChart;
}
