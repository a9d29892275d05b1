// SVG chart of one diversity–disturbance fit: the plots as points, the better model's curve with its
// 95 % confidence band for the mean, and for a hump (or U) the turning point with its interval.
// Built as a vega-lite spec, compiled to vega and rendered headless to SVG (no canvas needed).
import type { TopLevelSpec } from 'vega-lite';
import type { FitChartData, FitChartPoints } from '../fits/chart-data';
import { renderVegaLiteSvg } from './render';

export interface ChartPoint {
  readonly x: number;
  readonly y: number;
  /** Drawn in the highlight colour, on top (e.g. the plots of one region). */
  readonly highlight?: boolean;
  /** Where a click on the point leads (the plot's page); absent: not a link. */
  readonly href?: string;
}

export interface FitChartInput {
  readonly forestType: string;
  readonly metric: string;
  readonly axis: string;
  readonly points: readonly ChartPoint[];
  /** The fit as drawn (fitChartData of a result, or as stored by the fits job). */
  readonly chart: FitChartData;
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

type LayerItem = Extract<TopLevelSpec, { layer: unknown }>['layer'][number];

const num = (v: number): string => (Math.abs(v) >= 1e-3 && Math.abs(v) < 1e5 ? String(Number(v.toPrecision(3))) : v.toExponential(2));

/** The caption under the title: R², n and the verdict (with the turning point when there is one). */
export function fitChartCaption(chart: FitChartData): string {
  const { model, peak } = chart;
  const parts = [model ? `R² = ${num(model.r2)} (${model.name})` : 'no fit', `n = ${chart.n}`, `verdict: ${chart.verdict}`];
  if (model) parts.push('band: 95 % CI of the fitted mean');
  if (peak) {
    const what = chart.verdict === 'u_shape' ? 'trough' : 'peak';
    parts.push(`${what} at ${num(peak.x)} (${Math.round(100 * (1 - chart.alpha))} % CI ${num(peak.ciLow)} to ${num(peak.ciHigh)})`);
  }
  return parts.join(' · ');
}

/** The stored points of a forest type, those of `region` highlighted (in their stored order); `href` links the highlighted ones to their plot's page. */
export function regionChartPoints(points: FitChartPoints, region: string | null, href?: (plotKey: string) => string): ChartPoint[] {
  const at = region === null ? -1 : points.regions.indexOf(region);
  return points.x.map((x, i) => {
    const highlight = points.region[i] === at;
    const plot = points.plots?.[i];
    return highlight && href && plot !== undefined ? { x, y: points.y[i], highlight, href: href(plot) } : { x, y: points.y[i], highlight };
  });
}

/** The vega-lite specification of the chart (exported for inspection and tests). */
export function buildFitChartSpec(input: FitChartInput): TopLevelSpec {
  const { forestType, metric, axis, points, chart, width = 560, height = 340 } = input;
  const C = FIT_CHART_COLOURS;
  const x = { field: 'x', type: 'quantitative' as const, title: axis, scale: { zero: false, nice: false } };
  const y = { field: 'y', type: 'quantitative' as const, title: metric, scale: { zero: false } };
  const plain = points.filter((p) => !p.highlight).map((p) => ({ x: p.x, y: p.y }));
  const highlighted = points.filter((p) => p.highlight).map((p) => (p.href === undefined ? { x: p.x, y: p.y } : { x: p.x, y: p.y, href: p.href }));
  const linked = highlighted.some((p) => 'href' in p);
  const { x: cx, y: cy, low, high } = chart.curve;
  const curve = cx.map((v, i) => ({ x: v, y: cy[i], low: low[i], high: high[i] }));
  const layer: LayerItem[] = [];
  const peak = chart.peak;
  const showPeak = peak !== null && (chart.verdict === 'hump' || chart.verdict === 'u_shape');
  if (showPeak) {
    layer.push({
      name: 'peak_interval',
      data: { values: [{ x: peak!.ciLow, x2: peak!.ciHigh }] },
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
      mark: { type: 'point', filled: true, size: 46, color: C.highlight, stroke: '#5a2508', strokeWidth: 0.8, opacity: 0.95, aria: false, ...(linked ? { cursor: 'pointer' as const } : {}) },
      encoding: linked ? { x, y, href: { field: 'href' } } : { x, y },
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
      data: { values: [{ x: peak!.x }] },
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
    title: { text: `${forestType}: ${metric} against ${axis}`, subtitle: fitChartCaption(chart), anchor: 'start' },
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
export function renderFitChartSvg(input: FitChartInput): Promise<string> {
  return renderVegaLiteSvg(buildFitChartSpec(input));
}

