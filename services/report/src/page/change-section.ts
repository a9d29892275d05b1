import type { RegionRow } from '@stemwise/core';
import type { ChangeCoverage } from '../summary/change-coverage';
import { CHANGE_CAUTION, changeRows, NET_CARBON_MEANING } from '../summary/change-view';
import { figure } from './figures';
import { html, safeSvg, type Markup } from './html';
import { estimatesTable } from './region-page';

// The change between visits on a region page and the national page: which pairs of visits the
// estimates come from, the chart of gains, losses and net change per forest type, a caution, and the
// table of mortality, recruitment, growth and net change with SE, interval, sampling error and n.

/** Order of the change table: demography first, then the biomass budget, then carbon. */
const TABLE_ORDER = [
  'mortality_annual',
  'recruitment_annual',
  'dbh_increment_cm_yr',
  'agb_growth_mg_ha_yr',
  'agb_recruitment_mg_ha_yr',
  'agb_died_mg_ha_yr',
  'agb_removed_mg_ha_yr',
  'agb_loss_mg_ha_yr',
  'agb_net_change_mg_ha_yr',
  'carbon_net_change_mg_ha_yr',
];

const years = (a: string, b: string): string => (a.slice(0, 4) === b.slice(0, 4) ? a.slice(0, 4) : `${a.slice(0, 4)}–${b.slice(0, 4)}`);

/** Which plots and visits the estimates of change use, in a sentence. */
export function coverageSentence(c: ChangeCoverage): string {
  const span = c.interval_years;
  const apart = span.min === span.max ? `${figure(span.min)} years apart` : `${figure(span.min)} to ${figure(span.max)} years apart (mean ${figure(span.mean)})`;
  const types = c.by_forest_type.map((t) => `${t.forest_type} ${t.n_plots_with_pair} of ${t.n_plots}`).join(', ');
  return `From the ${c.n_plots_with_pair} of ${c.n_plots} plots measured twice or more (the latest two visits of each; ${types}), visits of ${years(c.first_visit, c.last_visit)}, ${apart}.`;
}

export interface ChangeSectionInput {
  readonly rows: readonly RegionRow[];
  readonly coverage: ChangeCoverage | null | undefined;
  readonly chartSvg: string | null | undefined;
  /** How the `all` stratum is named in the table. */
  readonly whole?: string;
  /** "region" or "country", for the caption. */
  readonly scope: string;
}

/** The section's content (under its own h2 on the page). */
export function changeSection(input: ChangeSectionInput): Markup {
  const rows = changeRows(input.rows);
  if (!rows.length) return html`<p class="muted" id="no-change">No plot has been measured twice yet: change between visits (mortality, recruitment, growth, net carbon change) appears here once plots are re-measured.</p>`;
  const ordered = TABLE_ORDER.flatMap((v) => rows.filter((r) => r.variable === v));
  const rest = rows.filter((r) => !TABLE_ORDER.includes(r.variable));
  const chart = safeSvg(input.chartSvg);
  return html`<div id="change">
  ${input.coverage ? html`<p id="change-coverage">${coverageSentence(input.coverage)}</p>` : html`<p class="muted" id="change-coverage">This summary version does not record which pairs of visits the estimates use; the column Plots gives their number.</p>`}
  <p class="muted">${NET_CARBON_MEANING}</p>
  ${chart ? html`<figure id="change-chart">${chart}<figcaption>Gains (survivor growth, recruitment), losses (trees that died, trees removed by logging; drawn below zero) and the net change of above-ground biomass per hectare and year, for the whole ${input.scope} and each forest type, with 95 % confidence intervals. Net carbon change is the net biomass change × the carbon fraction (table below).</figcaption></figure>` : null}
  <p class="caution" id="change-caution">${CHANGE_CAUTION}</p>
  ${estimatesTable([...ordered, ...rest], input.whole, { id: 'change-estimates', totals: false })}
  <p class="muted">Mortality and recruitment are annual shares of trees at a constant rate; growth, recruitment, losses and net change are Mg of above-ground biomass per hectare and year; no totals are given (rates, not stocks).</p>
</div>`;
}
