import type { NationalSnapshot } from '../national-snapshot';
import { HEADLINE_VARIABLES, variableLabel } from '@stemwise/core';
import { cautions, shownRow, visitsSentence } from './region-page';
import { estimate, estimateInterval, isoMinute, samplingError } from './figures';
import { html, type Markup } from './html';
import { pageShell } from './shell';

export interface IndexEntry {
  region: string;
  plots: number;
  version: number | null;
  updatedAt: Date | null;
  /** Link to the region's page; null when it has no summary yet. */
  href: string | null;
}

/** The national figures on the index page: where the viewer may see them (admins). */
export interface IndexNational {
  snapshot: NationalSnapshot;
  href: string;
}

function nationalSection(n: IndexNational): Markup {
  const { summary, data } = n.snapshot.payload;
  const rows = HEADLINE_VARIABLES.map((v) => summary.rows.find((r) => r.forest_type === 'all' && r.variable === v))
    .filter((r) => r !== undefined)
    .map(shownRow);
  return html`<section id="national">
  <h2>All regions together</h2>
  <p>Stratified by region × forest type over ${data.plots} plots in ${data.regions} regions. ${visitsSentence(data.first_survey, data.last_survey)} <a href="${n.href}">National figures by forest type</a> (version ${n.snapshot.version}, ${isoMinute(n.snapshot.createdAt)}).</p>
  <table class="national"><thead><tr><th>Variable</th><th class="num">Mean</th><th class="num">95 % CI</th><th class="num">Sampling error</th><th class="num">Plots</th></tr></thead><tbody>${rows.map((r) => {
    const label = variableLabel(r.variable);
    return html`<tr data-variable="${r.variable}"><td>${label.name}${label.unit ? html` <span class="muted">(${label.unit})</span>` : null}</td><td class="num">${estimate(r.mean, r.se)}</td><td class="num">${estimateInterval(r.ci_low, r.ci_high, r.se)}</td><td class="num">${samplingError(r.sampling_error_pct)}</td><td class="num">${r.n_plots}</td></tr>`;
  })}</tbody></table>
</section>`;
}

/** The list of regions the viewer may see, and the national figures when it may see them. */
export function renderIndexPage(entries: readonly IndexEntry[], options: { carbonFraction: number; signOut: string | null; national?: IndexNational | null; map?: Markup | null }): string {
  const body = html`
<header class="top"><div>
  <div class="where">stemwise</div>
  <h1>Regional forest inventory summaries</h1>
</div></header>
<main>
  ${cautions(options.carbonFraction)}
  ${options.national ? nationalSection(options.national) : null}
  <h2>Regions</h2>
  ${entries.length
    ? html`<table class="regions" id="regions"><thead><tr><th>Region</th><th class="num">Plots</th><th class="num">Summary version</th><th>Assembled</th></tr></thead><tbody>${entries.map(
        (e) => html`<tr><td>${e.href ? html`<a href="${e.href}">${e.region}</a>` : e.region}</td><td class="num">${e.plots}</td><td class="num">${e.version ?? '–'}</td><td>${e.updatedAt ? isoMinute(e.updatedAt) : 'not yet: waiting for the next recompute'}</td></tr>`,
      )}</tbody></table>`
    : html`<p>No region to show: none has been loaded yet, or this token may see none.</p>`}
  ${options.map ? html`<h2 id="where">Where the plots are</h2>${options.map}` : null}
</main>
<footer><div>${options.signOut ? html`<a class="no-print" href="${options.signOut}">Sign out</a>` : null}</div></footer>`;
  return pageShell('Regional forest inventory summaries', body);
}
