import type { DrawnNationalSnapshot } from '../chart-svgs';
import { figure, isoMinute } from './figures';
import { html, safeSvg, type Markup } from './html';
import { biomassMethodSection } from './biomass-method-section';
import { cautionLegend, cautions, estimatesTable, headlineCards, versionsList, visitsSentence, withoutChange } from './region-page';
import { changeSection } from './change-section';
import { poolsSection } from './pools-section';
import { pageShell } from './shell';
import { carbonUncertaintySection } from './carbon-uncertainty-section';
import { reportingThresholdNote, standTableSection } from './stand-table-section';

export interface NationalPageInput {
  /** The national snapshot with its charts drawn (chart-svgs.ts drawnNationalSnapshot). */
  snapshot: DrawnNationalSnapshot;
  carbonFraction: number;
  links: {
    index: string;
    summaryJson: string;
    summaryCsv: string;
    versionPage: ((version: number) => string) | null;
    signOut: string | null;
  };
  /** Every version of the national summary, newest first. */
  versions: ReadonlyArray<{ version: number; createdAt: Date }>;
  /** The map of every region's plots (page/map-section.ts); absent: not shown. */
  map?: Markup | null;
}

const WHOLE_COUNTRY = 'All regions (stratified by region × forest type)';

/** The HTML page of the national summary: all regions together, and each forest type nationally. */
export function renderNationalPage(input: NationalPageInput): string {
  const { snapshot: s, links } = input;
  const { summary, data, method } = s.payload;
  const latest = input.versions[0]?.version ?? s.version;
  const means = safeSvg(s.payload.charts.means);
  const weighting = summary.weighting === 'area' ? 'by forest area (strata.csv)' : 'by plot counts (forest areas incomplete)';
  const body = html`
<header class="top"><div>
  <div class="where"><a href="${links.index}">stemwise · regional inventory summaries</a></div>
  <h1>National figures</h1>
</div></header>
<main>
  <div class="facts">
    <span><b>${data.plots}</b> ${data.plots === 1 ? 'plot' : 'plots'} in <b>${data.regions}</b> ${data.regions === 1 ? 'region' : 'regions'}</span>
    <span>forest types: <b>${summary.forest_types.join(', ') || '–'}</b></span>
    <span id="visits">${visitsSentence(data.first_survey, data.last_survey)}</span>
    <span>summary <b>version ${s.version}</b> of ${isoMinute(s.createdAt)}</span>
    <span>strata weighted ${weighting}</span>
  </div>
  ${s.version !== latest ? html`<p class="caution">This is an earlier version (${s.version}); the latest is version ${latest}.</p>` : null}
  ${cautions(input.carbonFraction)}
  <h2 id="headline-figures">Headline figures for all regions together</h2>
  <p class="muted">Stratified estimates with every region × forest type as a stratum; 95 % intervals use Student t at Satterthwaite degrees of freedom.</p>
  ${headlineCards(summary.rows, summary.totals)}
  ${reportingThresholdNote(summary.rows)}
  ${cautionLegend(summary.caution)}
  <h2 id="carbon-pools">Carbon pools</h2>
  ${poolsSection(summary.rows, summary.totals, input.carbonFraction) ?? html`<p class="muted">This summary was made before the carbon pools were estimated; the next recompute adds them.</p>`}
  ${carbonUncertaintySection(s.payload.carbon_uncertainty, 'All regions together (stratified)')}
  ${carbonUncertaintySection(s.payload.tree_carbon_uncertainty, 'All regions together (stratified)')}
  ${means ? html`<h2>Charts</h2><figure id="means-chart">${means}<figcaption>Means per hectare with their 95 % confidence intervals: all regions together (dark) and each forest type nationally.</figcaption></figure>` : null}
  ${input.map ? html`<h2 id="where">Where the plots are</h2>${input.map}` : null}
  <h2>Estimates by forest type, nationally</h2>
  ${estimatesTable(withoutChange(summary.rows), WHOLE_COUNTRY)}
  ${cautionLegend(summary.caution)}
  <h2 id="change-between-visits">Change between visits</h2>
  ${changeSection({ rows: summary.rows, coverage: s.payload.change, chartSvg: s.payload.charts.change, whole: WHOLE_COUNTRY, scope: 'country' })}
  ${carbonUncertaintySection(s.payload.carbon_change_uncertainty, 'All regions together (stratified)')}
  ${carbonUncertaintySection(s.payload.tree_carbon_change_uncertainty, 'All regions together (stratified)')}
  <h2 id="stand-table-heading">Stand table by diameter class</h2>
  ${standTableSection(summary.rows, WHOLE_COUNTRY) ?? html`<p class="muted">No stand table in this version of the summary.</p>`}
  ${biomassMethodSection(s.payload.biomass_method)}
  <h2>Strata</h2>
  <table id="strata"><thead><tr><th>Region</th><th>Forest type</th><th class="num">Plots</th><th class="num">Forest area (ha)</th></tr></thead><tbody>${summary.strata.map(
    (t) => html`<tr><td>${t.region}</td><td>${t.forest_type}</td><td class="num">${t.n_plots}</td><td class="num">${figure(t.forest_area_ha)}</td></tr>`,
  )}</tbody></table>
  <h2>Method and notes</h2>
  <ul class="notes">
    <li>${method.estimator}</li>
    ${summary.notes.filter((n) => n.code !== 'caution').map((n) => html`<li>${n.message}</li>`)}
  </ul>
  <h2 class="no-print">Downloads</h2>
  <p class="downloads no-print">
    <a href="${links.summaryCsv}" download>National summary (CSV)</a>
    <a href="${links.summaryJson}">National summary (JSON)</a>
  </p>
  <h2>Versions of this summary</h2>
  ${versionsList({ versions: input.versions, links, snapshot: s })}
</main>
<footer><div>Made by stemwise from the plots loaded up to the summary's date.${links.signOut ? html` <a class="no-print" href="${links.signOut}">Sign out</a>` : null}</div></footer>`;
  return pageShell('National figures · forest inventory summary', body);
}
