// SVG chart of one diversity–disturbance fit: the plots as points, the better model's curve with its
// 95 % confidence band for the mean, and for a hump (or U) the turning point with its interval.
// Built as a vega-lite spec, compiled to vega and rendered headless to SVG (no canvas needed).
import * as vega from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';
import { predictPolynomial } from '../science/regression';
import { studentTQuantile } from '../science/student-t';
import type { CurveResult, ModelFit } from '../science/verdict';

export interface ChartPoint {
  readonly x: number;
  readonly y: number;
  /** Drawn in the highlight colour, on top (e.g. the plots of one region). */
  readonly highlight?: boolean;
}

export interface FitChartInput {
  readonly forestType: string;
  readonly metric: string;
  readonly axis: string;
  readonly points: readonly ChartPoint[];
  readonly fit: CurveResult;
  /** Plot area width in pixels. Default 560. */
  readonly width?: number;
  /** Plot area height in pixels. Default 340. */
  readonly height?: number;
}

/** Our own plain palette: muted slate points, orange highlights, green curve, sand peak interval. */
export const FIT_CHART_COLOURS = {
  point: '#6b7f99',
  highlight: '#c2571a',
  curve: '#235b3a',
  band: '#8fbf9f',
  peakInterval: '#e3d3a0',
  peakRule: '#7b3f61',
  grid: '#e4e4e4',
  text: '#333333',
} as const;

/** Number of x positions at which the curve and its band are evaluated. */
export const CURVE_STEPS = 120;

const BAND_LEVEL = 0.95;

type LayerItem = Extract<TopLevelSpec, { layer: unknown }>['layer'][number];

/** The model drawn: the parabola when it has the lower AICc, else the straight line. */
export function chartModel(fit: CurveResult): ModelFit | null {
  if (fit.quadratic && (fit.tests.quadraticPreferred || !fit.linear)) return fit.quadratic;
  return fit.linear;
}

const num = (v: number): string => (Math.abs(v) >= 1e-3 && Math.abs(v) < 1e5 ? String(Number(v.toPrecision(3))) : v.toExponential(2));

/** The caption under the title: R², n and the verdict (with the turning point when there is one). */
export function fitChartCaption(fit: CurveResult): string {
  const model = chartModel(fit);
  const parts = [model ? `R² = ${num(model.r2)} (${model.model})` : 'no fit', `n = ${fit.n}`, `verdict: ${fit.verdict}`];
  if (model) parts.push('band: 95 % CI of the fitted mean');
  if (fit.peak) {
    const what = fit.verdict === 'u_shape' ? 'trough' : 'peak';
    parts.push(`${what} at ${num(fit.peak.x)} (${Math.round(100 * (1 - fit.alpha))} % CI ${num(fit.peak.ciLow)} to ${num(fit.peak.ciHigh)})`);
  }
  return parts.join(' · ');
}

// Curve ŷ(x) with the band ŷ ± t_{0.975, df}·SE(ŷ) for the mean, on an even grid over the observed x range.
function curveRows(fit: CurveResult, model: ModelFit): { x: number; y: number; low: number; high: number }[] {
  if (fit.xMin === null || fit.xMax === null) return [];
  const t = studentTQuantile(1 - (1 - BAND_LEVEL) / 2, model.df);
  const span = fit.xMax - fit.xMin;
  return Array.from({ length: CURVE_STEPS + 1 }, (_, i) => {
    const x = fit.xMin! + (span * i) / CURVE_STEPS;
    const { mean, se } = predictPolynomial(model.fit, x);
    return { x, y: mean, low: mean - t * se, high: mean + t * se };
  });
}

/** The vega-lite specification of the chart (exported for inspection and tests). */
export function buildFitChartSpec(input: FitChartInput): TopLevelSpec {
  const { forestType, metric, axis, points, fit, width = 560, height = 340 } = input;
  const C = FIT_CHART_COLOURS;
  const x = { field: 'x', type: 'quantitative' as const, title: axis, scale: { zero: false, nice: false } };
  const y = { field: 'y', type: 'quantitative' as const, title: metric, scale: { zero: false } };
  const plain = points.filter((p) => !p.highlight).map((p) => ({ x: p.x, y: p.y }));
  const highlighted = points.filter((p) => p.highlight).map((p) => ({ x: p.x, y: p.y }));
  const model = chartModel(fit);
  const curve = model ? curveRows(fit, model) : [];
  const layer: LayerItem[] = [];
  const showPeak = fit.peak !== null && (fit.verdict === 'hump' || fit.verdict === 'u_shape');
  if (showPeak) {
    layer.push({
      name: 'peak_interval',
      data: { values: [{ x: fit.peak!.ciLow, x2: fit.peak!.ciHigh }] },
      mark: { type: 'rect', color: C.peakInterval, opacity: 0.5, aria: false },
      encoding: { x: { ...x, field: 'x' }, x2: { field: 'x2' } },
    });
  }
  if (curve.length > 0) {
    layer.push({
      name: 'band',
      data: { values: curve },
      mark: { type: 'area', color: C.band, opacity: 0.4, aria: false },
      encoding: { x, y: { ...y, field: 'low' }, y2: { field: 'high' } },
    });
  }
  layer.push({
    name: 'plots',
    data: { values: plain },
    mark: { type: 'point', filled: true, size: 22, color: C.point, opacity: 0.6, aria: false },
    encoding: { x, y },
  });
  if (highlighted.length > 0) {
    layer.push({
      name: 'highlighted',
      data: { values: highlighted },
      mark: { type: 'point', filled: true, size: 46, color: C.highlight, stroke: '#5a2508', strokeWidth: 0.8, opacity: 0.95, aria: false },
      encoding: { x, y },
    });
  }
  if (curve.length > 0) {
    layer.push({
      name: 'curve',
      data: { values: curve },
      mark: { type: 'line', color: C.curve, strokeWidth: 2.5, aria: false },
      encoding: { x, y },
    });
  }
  if (showPeak) {
    layer.push({
      name: 'peak',
      data: { values: [{ x: fit.peak!.x }] },
      mark: { type: 'rule', color: C.peakRule, strokeWidth: 1.5, strokeDash: [6, 3], aria: false },
      encoding: { x },
    });
  }
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    width,
    height,
    background: 'white',
    padding: 8,
    title: { text: `${forestType}: ${metric} against ${axis}`, subtitle: fitChartCaption(fit), anchor: 'start' },
    config: {
      font: 'sans-serif',
      view: { stroke: '#cccccc' },
      axis: { gridColor: C.grid, domainColor: '#999999', tickColor: '#999999', labelColor: C.text, titleColor: C.text, titleFontWeight: 'normal' },
      title: { color: C.text, fontSize: 14, subtitleColor: '#555555', subtitleFontSize: 12 },
    },
    layer,
  };
}

/** Renders the chart to an SVG string (vega-lite → vega → headless SVG renderer). */
export async function renderFitChartSvg(input: FitChartInput): Promise<string> {
  const vgSpec = compile(buildFitChartSpec(input)).spec;
  const view = new vega.View(vega.parse(vgSpec), { renderer: 'none' });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}
