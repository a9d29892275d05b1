import type { TopLevelSpec } from 'vega-lite';
import type { GuildRow } from '../region-summary/types';
import { REPORT_CHART_CONFIG, REPORT_COLOURS, WHOLE_REGION_LABEL, renderVegaLiteSvg } from './render';

const GUILD_ORDER = ['pioneer', 'light_demander', 'shade_tolerant', 'unassigned'] as const;
const GUILD_TITLES: Record<(typeof GUILD_ORDER)[number], string> = {
  pioneer: 'pioneer',
  light_demander: 'light-demanding',
  shade_tolerant: 'shade-tolerant',
  unassigned: 'unassigned',
};

/** Stacked bars: mean basal-area share of each guild, per forest type and for the whole region. */
export function buildGuildChartSpec(rows: readonly GuildRow[]): TopLevelSpec | null {
  const values = rows
    .filter((r) => r.mean_share !== null)
    .map((r) => ({
      stratum: r.forest_type === 'all' ? WHOLE_REGION_LABEL : r.forest_type,
      guild: GUILD_TITLES[r.guild],
      rank: GUILD_ORDER.indexOf(r.guild),
      share: r.mean_share,
    }));
  if (!values.length) return null;
  const order = [WHOLE_REGION_LABEL, ...[...new Set(values.map((v) => v.stratum).filter((s) => s !== WHOLE_REGION_LABEL))].sort()];
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    background: 'white',
    padding: 8,
    width: 520,
    height: { step: 26 },
    title: { text: 'Guild composition', subtitle: 'mean share of live basal area per plot' },
    data: { values },
    mark: { type: 'bar', aria: false },
    encoding: {
      y: { field: 'stratum', type: 'nominal', sort: order, title: null },
      x: { field: 'share', type: 'quantitative', stack: 'normalize', title: 'share of basal area', axis: { format: '%' } },
      color: {
        field: 'guild',
        type: 'nominal',
        sort: GUILD_ORDER.map((g) => GUILD_TITLES[g]),
        scale: { domain: GUILD_ORDER.map((g) => GUILD_TITLES[g]), range: GUILD_ORDER.map((g) => REPORT_COLOURS.guild[g]) },
        legend: { title: null, orient: 'bottom', direction: 'horizontal' },
      },
      order: { field: 'rank', type: 'quantitative' },
    },
    config: REPORT_CHART_CONFIG,
  } as TopLevelSpec;
}

export async function renderGuildChartSvg(rows: readonly GuildRow[]): Promise<string | null> {
  const spec = buildGuildChartSpec(rows);
  return spec ? renderVegaLiteSvg(spec) : null;
}
