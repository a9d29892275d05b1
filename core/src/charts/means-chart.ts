import type { TopLevelSpec } from 'vega-lite';
import type { RegionRow } from '../region-summary/types';
import { REPORT_CHART_CONFIG, REPORT_COLOURS, WHOLE_REGION_LABEL, renderVegaLiteSvg } from './render';
import { shortTitle } from '../region-summary/variables';

/** Variables drawn in the means chart, one panel each. */
/** The per-hectare figures at the reporting threshold (docs/methods.md#reporting-threshold): comparable between plots. */
export const MEANS_CHART_VARIABLES = ['reporting_stems_ha', 'reporting_basal_area_m2_ha', 'reporting_agb_mg_ha', 'reporting_carbon_mg_ha'] as const;

interface Bar {
  stratum: string;
  whole: boolean;
  mean: number;
  low: number;
  high: number;
}

// One panel: bars of the means, whiskers of the 95 % intervals, the y axis spanning both (never clipped).
function panel(title: string, bars: Bar[], order: string[]): Record<string, unknown> {
  const low = Math.min(0, ...bars.map((b) => b.low));
  const high = Math.max(0, ...bars.map((b) => b.high));
  const pad = 0.06 * (high - low || 1);
  const lo = low < 0 ? low - pad : 0;
  const hi = high + pad;
  const x = { field: 'stratum', type: 'nominal', sort: order, title: null, axis: { labelAngle: -30 } };
  const y = { type: 'quantitative', title: null, scale: { domain: [lo, hi], nice: true } };
  return {
    title: { text: title, fontSize: 12, fontWeight: 'normal' },
    width: 262,
    height: 110,
    data: { values: bars },
    layer: [
      {
        mark: { type: 'bar', aria: false },
        encoding: { x, y: { ...y, field: 'mean' }, color: { condition: { test: 'datum.whole', value: REPORT_COLOURS.region }, value: REPORT_COLOURS.forestType } },
      },
      { mark: { type: 'rule', color: REPORT_COLOURS.interval, strokeWidth: 1.5, aria: false }, encoding: { x, y: { ...y, field: 'low' }, y2: { field: 'high' } } },
      { mark: { type: 'tick', color: REPORT_COLOURS.interval, thickness: 1.5, size: 10, aria: false }, encoding: { x, y: { ...y, field: 'low' } } },
      { mark: { type: 'tick', color: REPORT_COLOURS.interval, thickness: 1.5, size: 10, aria: false }, encoding: { x, y: { ...y, field: 'high' } } },
    ],
  };
}

/** How the `all` bar is named: the whole region, or the whole country for the national rows. */
export interface WholeLabel {
  readonly label: string;
  readonly subtitle: string;
}
const WHOLE_REGION_BAR: WholeLabel = { label: WHOLE_REGION_LABEL, subtitle: 'dark: the whole region (stratified estimate); light: each forest type' };

/** Bars of the means per forest type and for the whole region, with their 95 % intervals as whiskers. */
export function buildMeansChartSpec(rows: readonly RegionRow[], whole: WholeLabel = WHOLE_REGION_BAR): TopLevelSpec | null {
  const panels: Record<string, unknown>[] = [];
  for (const variable of MEANS_CHART_VARIABLES) {
    const bars: Bar[] = rows
      .filter((r) => r.variable === variable && r.mean !== null)
      .map((r) => ({
        stratum: r.forest_type === 'all' ? whole.label : r.forest_type,
        whole: r.forest_type === 'all',
        mean: r.mean as number,
        low: r.ci_low ?? (r.mean as number),
        high: r.ci_high ?? (r.mean as number),
      }));
    if (!bars.length) continue;
    const order = [whole.label, ...bars.filter((b) => !b.whole).map((b) => b.stratum).sort()];
    panels.push(panel(shortTitle(variable), bars, order));
  }
  if (!panels.length) return null;
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    background: 'white',
    padding: 8,
    title: { text: 'Means with 95 % confidence intervals', subtitle: whole.subtitle },
    // Two panels a row: the chart keeps the report's width (REPORT_CHART_SIZE) with readable panels.
    concat: panels,
    columns: 2,
    spacing: 24,
    config: REPORT_CHART_CONFIG,
  } as unknown as TopLevelSpec;
}

export async function renderMeansChartSvg(rows: readonly RegionRow[], whole?: WholeLabel): Promise<string | null> {
  const spec = buildMeansChartSpec(rows, whole);
  return spec ? renderVegaLiteSvg(spec) : null;
}
