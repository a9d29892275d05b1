// SVG chart of one diversity–disturbance fit: the plots as points, the better model's curve with its
// 95 % confidence band for the mean, and for a hump (or U) the turning point with its interval.
// Built as a vega-lite spec, compiled to vega and rendered headless to SVG (no canvas needed).
import type { TopLevelSpec } from 'vega-lite';
import type { FitChartData, FitChartPoints } from '../fits/chart-data';
import { axisTitle, variableLabel } from '../region-summary/variables';
import { REPORT_CHART_FRAME, renderVegaLiteSvg } from './render';

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
  /** Legend entry of the highlighted points, e.g. "plots of Northvale". Default "highlighted plots". */
  readonly highlightLabel?: string;
  /** Chart width in pixels, padding and legend included. Default REPORT_CHART_SIZE.width. */
  readonly width?: number;
  /** Chart height in pixels, padding, title and legend included. Default REPORT_CHART_SIZE.height. */
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
  return fitChartCaptionLines(chart).join(' · ');
}

/** The caption in lines short enough for the chart's width: the fit, then the band and the turning point. */
export function fitChartCaptionLines(chart: FitChartData): string[] {
  const { model, peak } = chart;
  const first = [model ? `R² = ${num(model.r2)} (${model.name})` : 'no fit', `n = ${chart.n}`, `verdict: ${chart.verdict}`].join(' · ');
  const second: string[] = [];
  if (model) second.push('band: 95 % CI of the fitted mean');
  if (peak) {
    const what = chart.verdict === 'u_shape' ? 'trough' : 'peak';
    second.push(`${what} at ${num(peak.x)} (${Math.round(100 * (1 - chart.alpha))} % CI ${num(peak.ciLow)} to ${num(peak.ciHigh)})`);
  }
  return second.length ? [first, second.join(' · ')] : [first];
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

const highlightedCount = (points: readonly ChartPoint[]): number => points.reduce((n, p) => n + (p.highlight ? 1 : 0), 0);

/** The vega-lite specification of the chart (exported for inspection and tests). */
export function buildFitChartSpec(input: FitChartInput): TopLevelSpec {
  const { forestType, metric, axis, points, chart, width = REPORT_CHART_FRAME.width, height = REPORT_CHART_FRAME.height } = input;
  const C = FIT_CHART_COLOURS;
  const x = { field: 'x', type: 'quantitative' as const, title: axisTitle(axis), scale: { zero: false, nice: false } };
  const y = { field: 'y', type: 'quantitative' as const, title: axisTitle(metric), scale: { zero: false } };
  // The points carry a legend: the forest type's plots, and those highlighted (one region's) apart.
  const plainLabel = highlightedCount(points) > 0 ? 'other plots of the forest type' : 'plots of the forest type';
  const highlightLabel = input.highlightLabel ?? 'highlighted plots';
  const who = {
    field: 'who',
    type: 'nominal' as const,
    title: null,
    scale: { domain: [plainLabel, highlightLabel], range: [C.point, C.highlight] },
    legend: { orient: 'bottom' as const, direction: 'horizontal' as const, symbolType: 'circle', labelLimit: 400, values: highlightedCount(points) > 0 ? [plainLabel, highlightLabel] : [plainLabel] },
  };
  const plain = points.filter((p) => !p.highlight).map((p) => ({ x: p.x, y: p.y, who: plainLabel }));
  const highlighted = points.filter((p) => p.highlight).map((p) => (p.href === undefined ? { x: p.x, y: p.y, who: highlightLabel } : { x: p.x, y: p.y, who: highlightLabel, href: p.href }));
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
    mark: { type: 'point', filled: true, size: 22, opacity: 0.6, aria: false },
    encoding: { x, y, color: who },
  });
  if (highlighted.length > 0) {
    layer.push({
      name: 'highlighted',
      data: { values: highlighted },
      mark: { type: 'point', filled: true, size: 46, stroke: '#5a2508', strokeWidth: 0.8, opacity: 0.95, aria: false, ...(linked ? { cursor: 'pointer' as const } : {}) },
      encoding: linked ? { x, y, color: who, href: { field: 'href' } } : { x, y, color: who },
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
    autosize: REPORT_CHART_FRAME.autosize,
    background: 'white',
    padding: 8,
    title: { text: `${forestType}: ${variableLabel(metric).short} against ${variableLabel(axis).short}`, subtitle: fitChartCaptionLines(chart), anchor: 'start' },
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

