import type { RegionRow, TotalRow } from '@stemwise/core';
import { estimate, estimateInterval } from './figures';
import { html, type Markup } from './html';

// The carbon pools of a region (or all regions) on one small table: the three the tally covers with
// their stratified estimates, and the three it does not measure, named as not covered
// (docs/methods.md#pools-not-covered). Change between visits where plots were measured twice.

const WHOLE = 'all';

interface CoveredPool {
  readonly name: string;
  readonly how: string;
  /** Stock variable, Mg C/ha. */
  readonly stock: string;
  /** Change variable and whether it is biomass (× carbon fraction on the page) or already carbon. */
  readonly change: { readonly variable: string; readonly biomass: boolean };
}

/** The covered pools in reporting order; the last row is their sum. */
const COVERED: readonly CoveredPool[] = [
  { name: 'Live above-ground biomass', how: 'stems measured; pantropical allometry', stock: 'carbon_mg_ha', change: { variable: 'carbon_net_change_mg_ha_yr', biomass: false } },
  { name: 'Below-ground biomass (roots)', how: 'from above-ground biomass by a published root-to-shoot ratio', stock: 'bgb_carbon_mg_ha', change: { variable: 'bgb_net_change_mg_ha_yr', biomass: true } },
  { name: 'Standing dead wood', how: 'dead stems recorded; allometry reduced for lost crown and decay', stock: 'standing_dead_carbon_mg_ha', change: { variable: 'standing_dead_net_change_mg_ha_yr', biomass: true } },
  { name: 'Trees, the three pools above', how: 'sum', stock: 'tree_carbon_mg_ha', change: { variable: 'tree_carbon_net_change_mg_ha_yr', biomass: false } },
];

/** Pools of a national greenhouse-gas inventory that a tree tally does not measure. */
export const POOLS_NOT_COVERED: readonly string[] = ['Lying dead wood', 'Litter', 'Soil organic carbon'];

/** Mean with its 95 % interval, scaled (the carbon fraction of a biomass change is exact for a linear estimate). */
function meanWithInterval(r: RegionRow | undefined, scale = 1): Markup {
  if (r === undefined || r.mean === null) return html`–`;
  const se = r.se === null ? null : scale * r.se;
  const ci = r.ci_low === null || r.ci_high === null ? null : html` <span class="muted">(${estimateInterval(scale * r.ci_low, scale * r.ci_high, se)})</span>`;
  return html`${estimate(scale * r.mean, se)}${ci}`;
}

/**
 * The pools table of a summary's whole-area rows; null for a summary made before the pools existed.
 * `carbonFraction` turns the biomass changes of roots and dead wood into carbon on the page.
 */
export function poolsSection(rows: readonly RegionRow[], totals: readonly TotalRow[], carbonFraction: number): Markup | null {
  const whole = (v: string): RegionRow | undefined => rows.find((r) => r.forest_type === WHOLE && r.variable === v);
  if (whole('tree_carbon_mg_ha') === undefined) return null;
  const withChange = COVERED.some((p) => whole(p.change.variable)?.mean != null);
  const covered = COVERED.map((p, i) => {
    const t = totals.find((x) => x.forest_type === WHOLE && x.variable === p.stock);
    const change = withChange ? html`<td class="num">${meanWithInterval(whole(p.change.variable), p.change.biomass ? carbonFraction : 1)}</td>` : null;
    return html`<tr class="${i === COVERED.length - 1 ? 'whole' : ''}" data-pool="${p.stock}"><td>${p.name}</td><td>covered: ${p.how}</td>
  <td class="num">${meanWithInterval(whole(p.stock))}</td>
  <td class="num">${t ? html`${estimate(t.total, t.se)}${t.ci_low !== null && t.ci_high !== null ? html` <span class="muted">(${estimateInterval(t.ci_low, t.ci_high, t.se)})</span>` : null}` : '–'}</td>${change}</tr>`;
  });
  const missing = POOLS_NOT_COVERED.map(
    (name) => html`<tr class="not-covered" data-pool="not-covered"><td>${name}</td><td><strong>not covered</strong>: not measured by the tree tally</td><td class="num">–</td><td class="num">–</td>${withChange ? html`<td class="num">–</td>` : null}</tr>`,
  );
  return html`<table id="pools"><thead><tr><th>Carbon pool</th><th>Covered?</th><th class="num">Mg C/ha (95 % CI)</th><th class="num">Total, Mg C (95 % CI)</th>${withChange ? html`<th class="num">Net change, Mg C/ha/yr (95 % CI)</th>` : null}</tr></thead><tbody>${covered}${missing}</tbody></table>
<p class="caution" id="pools-caution">Carbon pools are estimates with their uncertainty. The intervals here cover sampling error only: the error of the biomass models, of the root-to-shoot ratios (IPCC 2006 Vol. 4 Table 4.4 or a published equation, chosen per forest type) and of the reduction for standing dead wood is not in them, so the true uncertainty is larger. Lying dead wood, litter and soil organic carbon are not measured, so the total is not the whole forest's carbon. National methods and the IPCC reporting rules decide which pools are reported and how: defer to them.</p>`;
}
