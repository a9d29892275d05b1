import type { BiomassMethodRow } from '../summary/biomass-method';
import { percentOfShare } from './figures';
import { html, type Markup } from './html';

// How the biomass of a region (or the country) was computed: the share of its AGB per height source
// (measured, modelled, none) and per wood-density level (docs/methods.md#biomass-method-shares).

const WHOLE = 'all';

export function biomassMethodSection(rows: readonly BiomassMethodRow[] | undefined, whole = 'All plots'): Markup | null {
  if (!rows || !rows.length) return null;
  const shown = rows.filter((r) => r.n_plots > 0);
  if (!shown.length) return null;
  return html`<section id="biomass-method"><h2>How the biomass was computed</h2>
<table id="biomass-method-table"><thead><tr><th>Stratum</th><th class="num">Plots</th><th class="num">Height measured</th><th class="num">Height modelled</th><th class="num">No height</th><th class="num">Wood density: species</th><th class="num">genus</th><th class="num">family</th><th class="num">plot mean</th><th class="num">default</th></tr></thead><tbody>${shown.map(
    (r) => html`<tr class="${r.forest_type === WHOLE ? 'whole' : ''}"><td>${r.forest_type === WHOLE ? whole : r.forest_type}</td><td class="num">${r.n_plots}</td><td class="num">${percentOfShare(r.height_measured)}</td><td class="num">${percentOfShare(r.height_modelled)}</td><td class="num">${percentOfShare(r.no_height)}</td><td class="num">${percentOfShare(r.wd_species)}</td><td class="num">${percentOfShare(r.wd_genus)}</td><td class="num">${percentOfShare(r.wd_family)}</td><td class="num">${percentOfShare(r.wd_plot)}</td><td class="num">${percentOfShare(r.wd_default)}</td></tr>`,
  )}</tbody></table>
<p class="muted">Shares of the plots' summed above-ground biomass per hectare (each plot weighs by its biomass; no interval). Height measured or modelled: Chave et al. 2014 eq. 4 with that height; no height: Chave et al. 2005 without height. The wood density of a stem comes from its species, else the mean of its genus or family, else the plot mean, else the regional default. The more biomass rests on modelled heights and default densities, the larger the model error that the intervals above do not include.</p></section>`;
}
