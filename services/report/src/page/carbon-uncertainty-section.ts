import { estimate, estimateInterval, standardError } from './figures';
import { html, type Markup } from './html';
import type { CarbonUncertaintySection } from '../carbon-uncertainty';

// The sections "Carbon stock: the whole uncertainty" (above-ground live trees), "Carbon in trees: the whole
// uncertainty" (the tree pool) and, on the change part of the page, "Net carbon change: the whole
// uncertainty" and "Net change of carbon in trees: the whole uncertainty" of the region and national pages: the sampling-only and the whole interval side by side,
// the share of each source, and what the intervals do and do not cover (docs/methods.md#carbon-uncertainty).

/** Per pool: heading, element ids, what the figure is, and its units. */
const POOLS = {
  'above-ground': { title: 'Carbon stock: the whole uncertainty', id: 'carbon', what: 'Above-ground carbon of live trees', unit: 'Mg C/ha', totalUnit: 'Mt C', totalWords: 'totals in Mt C = 10⁶ Mg C' },
  trees: {
    title: 'Carbon in trees: the whole uncertainty',
    id: 'tree-carbon',
    what: "Carbon in trees: live above- and below-ground biomass (each plot's own root-to-shoot ratio) and standing dead wood",
    unit: 'Mg C/ha',
    totalUnit: 'Mt C',
    totalWords: 'totals in Mt C = 10⁶ Mg C',
  },
  'above-ground change': {
    title: 'Net carbon change: the whole uncertainty',
    id: 'carbon-change',
    what: 'Net change of the above-ground carbon of live trees between the two latest visits of each plot measured twice',
    unit: 'Mg C/ha/yr',
    totalUnit: 'Mt C/yr',
    totalWords: 'totals in Mt C per year; negative: the forest lost carbon',
  },
  'tree change': {
    title: 'Net change of carbon in trees: the whole uncertainty',
    id: 'tree-carbon-change',
    what: "Net change of the carbon in trees (live above- and below-ground biomass, each visit's own root-to-shoot ratio, and standing dead wood) between the two latest visits of each plot measured twice",
    unit: 'Mg C/ha/yr',
    totalUnit: 'Mt C/yr',
    totalWords: 'totals in Mt C per year; negative: the forest lost carbon',
  },
} as const;

const SOURCE_NAMES = {
  sampling: 'sampling (plots)',
  allometry: 'biomass model, tree by tree',
  heightResidual: 'height model, tree by tree',
  woodDensity: 'wood density, tree by tree',
  heightParameters: 'height model parameters (shared)',
  rootShoot: 'root-to-shoot ratio (shared by row)',
} as const;

// Totals in Mt C, rounded like the means: the total's SE is the mean's SE times the forest area (total / mean).
const totalSe = (total: number, mean: number | null, se: number | null): number | null => (mean ? (Math.abs(total / mean) * (se ?? NaN)) / 1e6 : null);
const megatonnes = (total: number | null, mean: number | null, se: number | null): string => (total === null ? '–' : estimate(total / 1e6, totalSe(total, mean, se)));
const megatonneInterval = (low: number | null, high: number | null, total: number | null, mean: number | null, se: number | null): string =>
  low === null || high === null || total === null ? '–' : estimateInterval(low / 1e6, high / 1e6, totalSe(total, mean, se));

const pct = (x: number): string => (x < 0.0005 ? '< 0.1 %' : `${(100 * x).toFixed(1)} %`);

/** The section, or null for a summary made before it existed or with the setting off. */
export function carbonUncertaintySection(section: CarbonUncertaintySection | null | undefined, whole: string): Markup | null {
  if (!section) return null;
  const pool = POOLS[section.pool] ?? POOLS['above-ground'];
  const head = html`<h2 id="${pool.id}-uncertainty">${pool.title}</h2>`;
  if (section.missing !== null) return html`${head}<p class="muted">Not available: ${section.missing}</p>`;
  const name = (t: string): string => (t === 'all' ? whole : t);
  const sources = Object.keys(SOURCE_NAMES) as (keyof typeof SOURCE_NAMES)[];
  const used = sources.filter((k) => section.rows.some((r) => r.shares[k] > 0));
  return html`${head}
<p class="muted">${pool.what} (${pool.unit}; ${pool.totalWords}). Beside the sampling interval, the whole interval adds the error of the biomass and height models and of wood density${section.pool === 'trees' || section.pool === 'tree change' ? ' and of the root-to-shoot ratios' : ''}, by a Monte Carlo of ${section.draws} draws (IPCC 2006 Guidelines, Vol. 1, Ch. 3, approach 2; seed ${section.seed}, so the same data give the same interval).</p>
<table id="${pool.id}-whole"><thead><tr><th>Stratum</th><th class="num">Plots</th><th class="num">Mean</th><th class="num">95 % CI, sampling only</th><th class="num">95 % CI, whole</th><th class="num">Total, ${pool.totalUnit}</th><th class="num">Total, sampling only</th><th class="num">Total, whole</th></tr></thead><tbody>${section.rows.map(
    (r) => html`<tr class="${r.forest_type === 'all' ? 'whole' : ''}"><td>${name(r.forest_type)}</td><td class="num">${r.n_plots}</td><td class="num">${estimate(r.mean, r.sampling_se)}</td>
<td class="num">${estimateInterval(r.sampling_ci_low, r.sampling_ci_high, r.sampling_se)}</td><td class="num">${estimateInterval(r.whole_ci_low, r.whole_ci_high, r.whole_se)} <span class="muted">(SE ${standardError(r.whole_se)})</span></td>
<td class="num">${megatonnes(r.total, r.mean, r.sampling_se)}</td><td class="num">${megatonneInterval(r.total_sampling_ci_low, r.total_sampling_ci_high, r.total, r.mean, r.sampling_se)}</td><td class="num">${megatonneInterval(r.total_whole_ci_low, r.total_whole_ci_high, r.total, r.mean, r.whole_se)}</td></tr>`,
  )}</tbody></table>
<table id="${pool.id}-shares"><thead><tr><th>Stratum</th>${used.map((k) => html`<th class="num">${SOURCE_NAMES[k]}</th>`)}</tr></thead><tbody>${section.rows.map(
    (r) => html`<tr class="${r.forest_type === 'all' ? 'whole' : ''}"><td>${name(r.forest_type)}</td>${used.map((k) => html`<td class="num">${pct(r.shares[k])}</td>`)}</tr>`,
  )}</tbody></table>
<p class="muted">Share of each source in the variance of the estimate. Errors of single trees average out over the ${section.tree_error_scope === 'forest' ? 'trees of the whole forest area' : 'measured trees'}; errors shared by every tree of a forest type${section.pool === 'trees' ? ', or by every plot that reads the same row of a root-to-shoot relation,' : ''} do not.</p>
<section class="caution" aria-label="What the intervals cover">
  <p>The whole interval covers: ${section.covers.join('; ')}.</p>
  <p>It does not cover: ${section.not_covered.join('; ')}. The true uncertainty is therefore larger. Defer to national methods for greenhouse-gas reporting.</p>
</section>`;
}
