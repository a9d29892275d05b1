// A map of plots at their recorded coordinates (WGS 84), coloured by one plot variable: drawn by vega
// like the other charts, offline (no base map, no tile server). The projection is the plain
// equirectangular one with its standard parallel at the middle latitude of the plots: x = λ·cos φ₀,
// y = φ (Snyder 1987, "Map projections — a working manual", USGS Professional Paper 1395; memory), so that
// distances near the middle of the map look right (docs/methods.md#plot-maps). Each point links to the plot's page when given a link.
import type { TopLevelSpec } from 'vega-lite';
import { variableLabel } from '../region-summary/variables';
import { REPORT_CHART_CONFIG, renderVegaLiteSvg } from './render';

export interface MapPlot {
  readonly plot: string;
  readonly longitude: number;
  readonly latitude: number;
  /** The variable's value; null when the plot has none (drawn hollow). */
  readonly value: number | null;
  /** The plot page's address; null or absent: the point is not a link. */
  readonly href?: string | null;
  /** The plot's region: with more than one region on a map, each region has its own marker shape. */
  readonly region?: string;
}

export interface PlotMapInput {
  readonly plots: readonly MapPlot[];
  /** A column of `export plots` (catalogue label and unit in the legend). */
  readonly variable: string;
  readonly title: string;
  /** Width of the map in pixels (default 640); the height follows from the plots' extent. */
  readonly width?: number;
}

/** Marker shapes of the regions, in order of their names (the ramp colours the variable). */
const REGION_SHAPES = ['circle', 'square', 'triangle-up', 'diamond', 'triangle-down', 'cross', 'triangle-left', 'triangle-right'] as const;

/** Our own sequential ramp: sand to deep spruce, every step dark enough on white with its outline. */
export const MAP_COLOURS = { ramp: ['#f1e4b3', '#c5d68a', '#6fae73', '#2f7a62', '#1b4350'], noValue: '#77746b', outline: '#2b2f2a' } as const;

const MIN_SPAN_DEG = 0.02;
const PAD = 0.08;

/** The map's axis domains and pixel size: equal distances north–south and east–west near the middle. */
export function mapFrame(plots: readonly Pick<MapPlot, 'longitude' | 'latitude'>[], width: number): { lon: [number, number]; lat: [number, number]; width: number; height: number } {
  const lons = plots.map((p) => p.longitude);
  const lats = plots.map((p) => p.latitude);
  const [lon0, lon1, lat0, lat1] = [Math.min(...lons), Math.max(...lons), Math.min(...lats), Math.max(...lats)];
  const midLat = (lat0 + lat1) / 2;
  const cos = Math.max(0.05, Math.cos((midLat * Math.PI) / 180));
  let lonSpan = Math.max(MIN_SPAN_DEG, lon1 - lon0) * (1 + 2 * PAD);
  let latSpan = Math.max(MIN_SPAN_DEG, lat1 - lat0) * (1 + 2 * PAD);
  const [minH, maxH] = [Math.round(width * 0.45), Math.round(width * 1.1)];
  let height = (width * latSpan) / (lonSpan * cos);
  if (height > maxH) {
    height = maxH;
    lonSpan = (latSpan * width) / (maxH * cos); // widen east–west to keep the scale equal
  } else if (height < minH) {
    height = minH;
    latSpan = (lonSpan * cos * minH) / width; // widen north–south
  }
  const [lonMid, latMid] = [(lon0 + lon1) / 2, (lat0 + lat1) / 2];
  return { lon: [lonMid - lonSpan / 2, lonMid + lonSpan / 2], lat: [latMid - latSpan / 2, latMid + latSpan / 2], width, height: Math.round(height) };
}

const degrees = (pos: string, neg: string) => `format(abs(datum.value), '.2~f') + '° ' + (datum.value < 0 ? '${neg}' : datum.value > 0 ? '${pos}' : '')`;

/** The vega-lite specification of the map, or null without plots. */
export function buildPlotMapSpec(input: PlotMapInput): TopLevelSpec | null {
  const { plots, variable, title, width = 640 } = input;
  if (!plots.length) return null;
  const label = variableLabel(variable);
  const legendTitle = label.unit ? `${label.name} (${label.unit})` : label.name;
  const frame = mapFrame(plots, width);
  const size = plots.length <= 50 ? 90 : plots.length <= 500 ? 46 : 18;
  const rows = plots.map((p) => ({ plot: p.plot, lon: p.longitude, lat: p.latitude, value: p.value, href: p.href ?? null, region: p.region ?? '' }));
  const regions = [...new Set(rows.map((r) => r.region))].sort();
  // More regions than shapes: the shapes repeat, and the legend still names each region.
  const shape =
    regions.length > 1
      ? { shape: { field: 'region', type: 'nominal', title: 'Region', scale: { domain: regions, range: regions.map((_, i) => REGION_SHAPES[i % REGION_SHAPES.length]) }, legend: { orient: 'bottom', direction: 'horizontal', symbolFillColor: '#cfcabb', symbolStrokeColor: MAP_COLOURS.outline } } }
      : {};
  const withValue = rows.filter((r) => r.value !== null && Number.isFinite(r.value));
  const without = rows.filter((r) => !(r.value !== null && Number.isFinite(r.value)));
  const linked = rows.some((r) => r.href !== null);
  const x = { field: 'lon', type: 'quantitative', title: 'Longitude (WGS 84)', scale: { domain: frame.lon, nice: false, zero: false }, axis: { labelExpr: degrees('E', 'W'), tickCount: 6 } };
  const y = { field: 'lat', type: 'quantitative', title: 'Latitude (WGS 84)', scale: { domain: frame.lat, nice: false, zero: false }, axis: { labelExpr: degrees('N', 'S'), tickCount: 6 } };
  const href = linked ? { href: { field: 'href' } } : {};
  const layer: Record<string, unknown>[] = [];
  if (withValue.length) {
    layer.push({
      name: 'plots',
      data: { values: withValue },
      mark: { type: 'point', shape: 'circle', filled: true, size, opacity: 0.95, stroke: MAP_COLOURS.outline, strokeWidth: 0.7, aria: false, cursor: linked ? 'pointer' : undefined },
      encoding: {
        x,
        y,
        ...shape,
        color: { field: 'value', type: 'quantitative', title: legendTitle, scale: { range: [...MAP_COLOURS.ramp] }, legend: { orient: 'bottom', direction: 'horizontal', gradientLength: Math.min(360, width - 80), titleLimit: width, format: '~r' } },
        ...href,
      },
    });
  }
  if (without.length) {
    layer.push({
      name: 'no_value',
      data: { values: without },
      mark: { type: 'point', shape: 'circle', size, filled: false, strokeWidth: 1.4, aria: false },
      encoding: {
        x,
        y,
        stroke: { datum: 'no value', type: 'nominal', scale: { range: [MAP_COLOURS.noValue] }, legend: { title: null, orient: 'bottom' } },
        ...shape,
        ...href,
      },
    });
  }
  if (plots.length <= 25) {
    layer.push({ name: 'names', data: { values: rows }, mark: { type: 'text', dx: 7, align: 'left', baseline: 'middle', fontSize: 10, color: '#44483f', aria: false }, encoding: { x, y, text: { field: 'plot' } } });
  }
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    background: 'white',
    padding: 8,
    width: frame.width,
    height: frame.height,
    title: { text: title, subtitle: `coloured by ${legendTitle}; plain latitude–longitude projection, no base map` },
    layer,
    resolve: { scale: { color: 'independent', stroke: 'independent' } },
    config: REPORT_CHART_CONFIG,
  } as unknown as TopLevelSpec;
}

export async function renderPlotMapSvg(input: PlotMapInput): Promise<string | null> {
  const spec = buildPlotMapSpec(input);
  return spec ? renderVegaLiteSvg(spec) : null;
}
