import type { TopLevelSpec } from 'vega-lite';
import type { RegionRow } from '../region-summary/types';
import { variableLabel } from '../region-summary/variables';
import { REPORT_CHART_CONFIG, REPORT_CHART_SIZE, WHOLE_REGION_LABEL, renderVegaLiteSvg } from './render';
import type { WholeLabel } from './means-chart';

// Change between visits per forest type (and for the whole region or country): the gains (survivor
// growth, recruitment), the losses (trees that died, trees removed), drawn below zero, and the net
// change, each a stratified estimate with its 95 % interval (docs/methods.md#change-between-visits).

/** The parts of the biomass change, in the order drawn, with whether each is a loss (drawn below zero). */
export const CHANGE_CHART_PARTS = [
  { variable: 'agb_growth_mg_ha_yr', part: 'survivor growth', loss: false },
  { variable: 'agb_recruitment_mg_ha_yr', part: 'recruitment', loss: false },
  { variable: 'agb_died_mg_ha_yr', part: 'died', loss: true },
  { variable: 'agb_removed_mg_ha_yr', part: 'removed', loss: true },
  { variable: 'agb_net_change_mg_ha_yr', part: 'net change', loss: false },
] as const;

/** Our own colours: greens for gains, browns for losses, deep slate for the net change. */
export const CHANGE_COLOURS = ['#4f8a5b', '#9cc7a0', '#a5633a', '#dcb48c', '#34495e'] as const;

interface ChangeBar {
  stratum: string;
  part: string;
  value: number;
  low: number;
  high: number;
}

/** Bars of gains, losses (below zero) and net change per stratum with 95 % whiskers; null when no stratum has a change estimate. */
export function buildChangeChartSpec(rows: readonly RegionRow[], whole: Pick<WholeLabel, 'label'> = { label: WHOLE_REGION_LABEL }): TopLevelSpec | null {
  const bars: ChangeBar[] = [];
  for (const { variable, part, loss } of CHANGE_CHART_PARTS) {
    for (const r of rows) {
      if (r.variable !== variable || r.mean === null) continue;
      const sign = loss ? -1 : 1;
      const [a, b] = [r.ci_low ?? r.mean, r.ci_high ?? r.mean].map((x) => sign * x);
      bars.push({ stratum: r.forest_type === 'all' ? whole.label : r.forest_type, part, value: sign * r.mean, low: Math.min(a, b), high: Math.max(a, b) });
    }
  }
  if (!bars.length) return null;
  const order = [whole.label, ...[...new Set(bars.map((b) => b.stratum).filter((s) => s !== whole.label))].sort()];
  const parts = CHANGE_CHART_PARTS.map((p) => p.part);
  const x = { field: 'stratum', type: 'nominal', sort: order, title: null, axis: { labelAngle: 0 } };
  const xOffset = { field: 'part', type: 'nominal', sort: parts };
  const unit = variableLabel('agb_net_change_mg_ha_yr').unit;
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    // Bands of a discrete axis cannot be fitted to a size by vega: the plot area is set, and the
    // rendered SVG brought to the report's width (renderVegaLiteSvg).
    width: REPORT_CHART_SIZE.width - 90,
    height: REPORT_CHART_SIZE.height - 110,
    background: 'white',
    padding: 8,
    title: {
      text: 'Gains, losses and net change of biomass',
      subtitle: ['above-ground biomass between two visits', `${unit}; losses below zero; whiskers: 95 % CI`],
    },
    data: { values: bars },
    layer: [
      {
        mark: { type: 'bar', aria: false },
        encoding: {
          x,
          xOffset,
          y: { field: 'value', type: 'quantitative', title: `Biomass change (${unit})` },
          color: { field: 'part', type: 'nominal', sort: parts, scale: { domain: parts, range: [...CHANGE_COLOURS] }, legend: { title: null, orient: 'bottom', direction: 'horizontal', labelLimit: 400 } },
        },
      },
      { mark: { type: 'rule', color: '#3b2a1a', strokeWidth: 1.3, aria: false }, encoding: { x, xOffset, y: { field: 'low', type: 'quantitative' }, y2: { field: 'high' } } },
      { mark: { type: 'rule', color: '#555555', strokeWidth: 1, aria: false }, encoding: { y: { datum: 0, type: 'quantitative' } } },
    ],
    config: REPORT_CHART_CONFIG,
  } as unknown as TopLevelSpec;
}

export async function renderChangeChartSvg(rows: readonly RegionRow[], whole?: Pick<WholeLabel, 'label'>): Promise<string | null> {
  const spec = buildChangeChartSpec(rows, whole);
  return spec ? renderVegaLiteSvg(spec) : null;
}
