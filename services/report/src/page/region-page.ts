import { problemLine, type ProblemView } from '@stemwise/db';
import type { DrawnCharts, Snapshot } from '../snapshot-payload';
import { CAUTION_WORDS, HEADLINE_VARIABLES, isStandVariable, shownValue, totalUnit, variableLabel, type CautionSettings, type DisturbanceRow, type RegionRow, type TotalRow } from '@stemwise/core';
import { estimate, estimateInterval, figure, isoMinute, samplingError, sharePercent, standardError } from './figures';
import { html, safeSvg, type Markup } from './html';
import { pageShell } from './shell';
import { fitsSection } from './fits-section';
import { carbonUncertaintySection } from './carbon-uncertainty-section';
import { changeSection } from './change-section';
import { changeRows } from '../summary/change-view';
import { poolsSection } from './pools-section';
import { reportingThresholdNote, standTableSection } from './stand-table-section';
import { biomassMethodSection } from './biomass-method-section';
import { plotSizeNote } from './plot-size-note';
import { whatChangedSection } from './what-changed-section';
import type { SummaryChanges } from '../summary/summary-changes';

export interface RegionPageLinks {
  index: string;
  summaryJson: string;
  summaryCsv: string;
  plotsGeoJson: string;
  /** Page of another version; null where versions cannot be opened (the static report). */
  versionPage: ((version: number) => string) | null;
  signOut: string | null;
}

export interface RegionPageInput {
  /** The snapshot with its charts drawn (chart-svgs.ts drawnSnapshot). */
  snapshot: Snapshot<DrawnCharts>;
  links: RegionPageLinks;
  /** Every version of the region's summary, newest first. */
  versions: ReadonlyArray<{ version: number; createdAt: Date }>;
  /** What the latest recompute could not compute for this region (its plots, fits, summary); a short note when any. */
  problems?: readonly ProblemView[];
  /** The plot map and the plot table (page/map-section.ts, page/plot-table.ts); absent: not shown. */
  plots?: { map: Markup; table: Markup } | null;
  /** What changed since the version before (docs/methods.md#what-changed-between-versions); absent where not read. */
  changes?: SummaryChanges | null;
}

const WHOLE = 'all';
const plots = (n: number): string => `${n} ${n === 1 ? 'plot' : 'plots'}`;
const stratumName = (t: string, whole = 'Whole region (stratified)'): string => (t === WHOLE ? whole : t);
const GUILD_NAMES: Record<string, string> = { pioneer: 'Pioneer', light_demander: 'Light-demanding', shade_tolerant: 'Shade-tolerant', unassigned: 'Unassigned' };

/** The cautions every region page shows, in our words. */
export function cautions(carbonFraction: number): Markup {
  return html`<section class="caution" aria-label="Read this first">
  <strong>Read this first.</strong>
  <ul>
    <li>These are estimates from a sample of plots, not a census. Every figure is shown with its standard error, 95 % confidence interval and sampling error: read the interval, not only the mean.</li>
    <li>Biomass and carbon follow the method stated on this page (Chave et al. 2014, or Chave et al. 2005 where heights are missing; carbon = ${carbonFraction} × biomass, IPCC 2006). The intervals cover sampling error only, not the error of the biomass models, except the whole interval of the above-ground carbon stock (section “Carbon stock: the whole uncertainty”), which adds the model errors it names. These figures do not replace the national greenhouse-gas reporting method.</li>
    <li>Figures are rounded to the precision their standard error supports: the SE to two significant digits, the estimate and its interval to the same decimal place (common practice, as advised in the GUM, JCGM 100:2008). The downloads keep full precision.</li>
    <li>This page is no logging plan: decisions on harvesting rest with local regulations and licensed foresters.</li>
  </ul>
</section>`;
}

/** Which visits the figures use, in a sentence with the survey years from the data. */
export function visitsSentence(first: string | null, last: string | null): string {
  if (first === null || last === null) return 'Uses the latest visit of each plot (no plot surveyed yet).';
  const [a, b] = [first.slice(0, 4), last.slice(0, 4)];
  return `Uses the latest visit of each plot, surveyed ${a === b ? a : `${a}–${b}`}.`;
}

/** The visible mark of an estimate to read with care (few plots, wide error); null for the others. */
export function cautionMark(r: RegionRow): Markup | null {
  const flag = r.caution_flag;
  if (flag === undefined || flag === 'none') return null;
  return html`<span class="flag" data-flag="${flag}">${CAUTION_WORDS[flag]}</span>`;
}

/** The sentence that explains the marks, with the thresholds the summary used; null for a summary made before them. */
export function cautionLegend(caution: CautionSettings | undefined): Markup | null {
  if (!caution) return null;
  return html`<p class="muted caution-legend">Marked <span class="flag">few plots</span>: from fewer than ${caution.min_plots} plots; <span class="flag">wide error</span>: a sampling error above ${caution.max_sampling_error_pct} %; <span class="flag">no error estimate</span>: no sampling error could be computed. Read marked figures with particular care: they can move a lot with a few more plots (thresholds of common practice, set in the configuration).</p>`;
}

export function headlineCards(rows: readonly RegionRow[], totals: readonly TotalRow[]): Markup {
  const cards = HEADLINE_VARIABLES.map((v) => {
    const found = rows.find((x) => x.forest_type === WHOLE && x.variable === v);
    if (!found) return null;
    const r = shownRow(found);
    const label = variableLabel(v);
    const t = totals.find((x) => x.forest_type === WHOLE && x.variable === v);
    return html`<div class="card" data-variable="${v}">
  <div class="label">${label.name}</div>
  <div class="value">${estimate(r.mean, r.se)} <span class="unit">${label.unit}</span></div>
  <div class="ci">95 % CI: ${estimateInterval(r.ci_low, r.ci_high, r.se)}</div>
  <div class="se">sampling error: ${samplingError(r.sampling_error_pct)} · SE ${standardError(r.se)}</div>
  <div class="n muted">${plots(r.n_plots)}${cautionMark(r)}</div>
  ${t ? html`<div class="total">total ${estimate(t.total, t.se)} ${totalUnit(v)} (95 % CI ${estimateInterval(t.ci_low, t.ci_high, t.se)}) on ${figure(t.forest_area_ha)} ha</div>` : null}
</div>`;
  });
  return html`<div class="cards" id="headline">${cards}</div>`;
}

// SE of mean × area with the area known without error: SE × area (Cochran 1977 ch. 5)
const totalSe = (r: RegionRow): number | null => (r.se !== null && r.forest_area_ha !== null ? r.se * r.forest_area_ha : null);

/** A row in the unit its variable is shown in (shares × 100, in percent); totals are never shares. */
export function shownRow(r: RegionRow): RegionRow {
  if (!variableLabel(r.variable).percent) return r;
  const v = (x: number | null) => shownValue(r.variable, x);
  return { ...r, mean: v(r.mean), se: v(r.se), ci_low: v(r.ci_low), ci_high: v(r.ci_high) };
}

export interface EstimatesTableOptions {
  /** The table's id (default `estimates`). */
  readonly id?: string;
  /** Show forest area and total columns (default true). */
  readonly totals?: boolean;
}

export function estimatesTable(rows: readonly RegionRow[], whole?: string, options: EstimatesTableOptions = {}): Markup {
  const { id = 'estimates', totals = true } = options;
  // The stand-table classes have a table of their own (stand-table-section.ts).
  const variables = [...new Set(rows.map((r) => r.variable))].filter((v) => !isStandVariable(v));
  const body = variables.map((v) => {
    const group = rows
      .filter((r) => r.variable === v)
      .sort((a, b) => (a.forest_type === WHOLE ? -1 : b.forest_type === WHOLE ? 1 : a.forest_type < b.forest_type ? -1 : 1))
      .map(shownRow);
    const label = variableLabel(v);
    return group.map(
      (r, i) => html`<tr class="${r.forest_type === WHOLE ? 'whole' : ''}" data-variable="${v}" data-forest-type="${r.forest_type}">
  ${i === 0 ? html`<td rowspan="${group.length}">${label.name}${label.unit ? html` <span class="muted">(${label.unit})</span>` : null}</td>` : null}
  <td>${stratumName(r.forest_type, whole)}</td><td class="num">${r.n_plots}</td><td class="num">${estimate(r.mean, r.se)}${cautionMark(r)}</td><td class="num">${standardError(r.se)}</td>
  <td class="num">${estimateInterval(r.ci_low, r.ci_high, r.se)}</td><td class="num">${samplingError(r.sampling_error_pct)}</td>
  ${totals ? html`<td class="num">${figure(r.forest_area_ha)}</td><td class="num">${estimate(r.total, totalSe(r))}</td>` : null}
</tr>`,
    );
  });
  return html`<table id="${id}"><thead><tr><th>Variable</th><th>Stratum</th><th class="num">Plots</th><th class="num">Mean</th><th class="num">SE</th><th class="num">95 % CI</th><th class="num">Sampling error</th>${totals ? html`<th class="num">Forest area (ha)</th><th class="num">Total</th>` : null}</tr></thead><tbody>${body}</tbody></table>`;
}

function guildTable(s: Snapshot): Markup | null {
  const rows = s.payload.summary.guild_composition;
  if (!rows.length) return null;
  const strata = [...new Set(rows.map((r) => r.forest_type))];
  const guilds = [...new Set(rows.map((r) => r.guild))];
  return html`<table id="guilds"><thead><tr><th>Stratum</th>${guilds.map((g) => html`<th class="num">${GUILD_NAMES[g] ?? g}</th>`)}</tr></thead><tbody>${strata.map(
    (t) => html`<tr class="${t === WHOLE ? 'whole' : ''}"><td>${stratumName(t)}</td>${guilds.map((g) => {
      const r = rows.find((x) => x.forest_type === t && x.guild === g);
      return html`<td class="num">${sharePercent(r?.mean_share, r?.se)}${r?.se != null ? html` <span class="muted">± ${standardError(100 * r.se)} %</span>` : null}</td>`;
    })}</tr>`,
  )}</tbody></table>`;
}

function classRange(r: DisturbanceRow): string {
  if (r.lower === null && r.upper === null) return 'all';
  if (r.lower === null) return `below ${r.upper}`;
  if (r.upper === null) return `${r.lower} and above`;
  return `${r.lower} to below ${r.upper}`;
}

// Counts and shares in columns of their own, each headed by what it is: a forest type's share is the
// share of its plots; the whole region's is the stratified estimate (of forest area when areas are known).
function disturbanceTable(s: Snapshot): Markup | null {
  const { rows, plots_without_index } = s.payload.summary.disturbance;
  if (!rows.length) return null;
  const strata = [...new Set(rows.map((r) => r.forest_type))];
  const classes = [...new Set(rows.map((r) => r.class))];
  const missing = plots_without_index.filter((p) => p.n_plots > 0);
  const wholeShare = s.payload.summary.weighting === 'area' ? '% of forest area (stratified)' : '% of plots (stratified, plot-count weights)';
  return html`<table id="disturbance"><thead><tr><th rowspan="2">Class</th><th rowspan="2">Disturbance index</th>${strata.map((t) => html`<th class="num" colspan="2">${stratumName(t)}</th>`)}</tr>
<tr>${strata.map((t) => html`<th class="num">Plots (count)</th><th class="num">${t === WHOLE ? wholeShare : '% of its plots'}</th>`)}</tr></thead><tbody>${classes.map((c) => {
    const first = rows.find((r) => r.class === c) as DisturbanceRow;
    return html`<tr><td>${c.replace(/_/g, ' ')}</td><td>${classRange(first)}</td>${strata.map((t) => {
      const r = rows.find((x) => x.forest_type === t && x.class === c);
      return r ? html`<td class="num">${r.n_plots}</td><td class="num">${sharePercent(r.share, r.share_se)}</td>` : html`<td class="num">–</td><td class="num">–</td>`;
    })}</tr>`;
  })}</tbody></table>
<p class="muted">Plots (count): plots of the class. Per forest type, the share is the share of its plots with a disturbance index; for the whole region it is the stratified estimate (${s.payload.summary.weighting === 'area' ? 'forest types weighted by forest area: an estimate of the share of forest area' : 'forest types weighted by plot counts, as no forest areas were given'}), so it need not equal the pooled count over all plots.${missing.length ? ` Plots without a disturbance index: ${missing.map((m) => `${m.forest_type} ${m.n_plots}`).join(', ')}.` : ''}</p>`;
}

// Species counts are pooled (distinct species over the plots of a stratum), not stratified estimates.
function speciesTable(s: Snapshot): Markup | null {
  const rows = s.payload.summary.species;
  if (!rows) return null;
  return html`<table id="species"><thead><tr><th>Stratum</th><th class="num">Species recorded (pooled count)</th><th class="num">Plots pooled</th></tr></thead><tbody>${rows.map(
    (r) => html`<tr class="${r.forest_type === WHOLE ? 'whole' : ''}"><td>${stratumName(r.forest_type, 'Whole region (pooled over all plots)')}</td><td class="num">${r.n_species}</td><td class="num">${r.n_plots_with_names}</td></tr>`,
  )}</tbody></table>
<p class="muted">Pooled counts, not estimates: the distinct species among the live main-plot stems identified to species of all the stratum's plots together (synonyms counted as their accepted name). They grow with the number and size of the plots pooled: compare strata with care.</p>`;
}

// A short note of what could not be computed: the figures shown leave these parts out or are older for them.
function problemsNote(problems: readonly ProblemView[]): Markup | null {
  if (!problems.length) return null;
  const shown = problems.slice(0, 5);
  return html`<div class="caution" id="not-computed"><p>Not computed in the latest recompute (the rest of the page is up to date; these parts are missing or older):</p><ul>${shown.map((p) => html`<li>${problemLine(p)}</li>`)}</ul>${problems.length > shown.length ? html`<p>… and ${problems.length - shown.length} more (see <code>stemwise batch show</code>).</p>` : null}</div>`;
}

export interface VersionsInput {
  readonly versions: RegionPageInput['versions'];
  readonly links: Pick<RegionPageLinks, 'versionPage'>;
  readonly snapshot: { readonly version: number };
}

export function versionsList(input: VersionsInput): Markup {
  const { versions, links, snapshot } = input;
  return html`<ul class="versions">${versions.map((v) => {
    const label = `version ${v.version} · ${isoMinute(v.createdAt)}`;
    if (v.version === snapshot.version) return html`<li><strong>${label}</strong> (shown)</li>`;
    return html`<li>${links.versionPage ? html`<a href="${links.versionPage(v.version)}">${label}</a>` : label}</li>`;
  })}</ul>`;
}

/** The rows of the stock and diversity variables: change between visits has its own section. */
export function withoutChange(rows: readonly RegionRow[]): RegionRow[] {
  const change = new Set(changeRows(rows));
  return rows.filter((r) => !change.has(r));
}

/** The HTML page of one region's summary snapshot. */
export function renderRegionPage(input: RegionPageInput): string {
  const { snapshot: s, links } = input;
  const { summary, data, method, charts } = s.payload;
  const latest = input.versions[0]?.version ?? s.version;
  const means = safeSvg(charts.means);
  const guilds = safeSvg(charts.guilds);
  const weighting = summary.weighting === 'area' ? 'by forest area (strata.csv)' : 'by plot counts (no forest areas given)';
  const body = html`
<header class="top"><div>
  <div class="where"><a href="${links.index}">stemwise · regional inventory summaries</a></div>
  <h1>Region ${s.region}</h1>
</div></header>
<main>
  <div class="facts">
    <span><b>${data.plots}</b> ${data.plots === 1 ? 'plot' : 'plots'}</span>
    <span>forest types: <b>${summary.forest_types.join(', ') || '–'}</b></span>
    <span>surveyed <b>${data.first_survey ?? '–'}</b> to <b>${data.last_survey ?? '–'}</b></span>
    <span id="visits">${visitsSentence(data.first_survey, data.last_survey)}</span>
    <span>summary <b>version ${s.version}</b> of ${isoMinute(s.createdAt)}</span>
    <span>strata weighted ${weighting}</span>
  </div>
  ${s.version !== latest ? html`<p class="caution">This is an earlier version (${s.version}); the latest is version ${latest}.</p>` : null}
  ${cautions(method.carbon_fraction)}
  ${problemsNote(input.problems ?? [])}
  <h2 id="headline-figures">Headline figures for the whole region</h2>
  <p class="muted">Stratified estimates over the forest types; 95 % intervals use Student t (degrees of freedom in the notes below).</p>
  ${headlineCards(summary.rows, summary.totals)}
  ${reportingThresholdNote(summary.rows)}
  ${cautionLegend(summary.caution)}
  <h2 id="carbon-pools">Carbon pools</h2>
  ${poolsSection(summary.rows, summary.totals, method.carbon_fraction) ?? html`<p class="muted">This summary was made before the carbon pools were estimated; the next recompute adds them.</p>`}
  ${carbonUncertaintySection(s.payload.carbon_uncertainty, 'Whole region (stratified)')}
  ${carbonUncertaintySection(s.payload.tree_carbon_uncertainty, 'Whole region (stratified)')}
  <h2>Charts</h2>
  ${means ? html`<figure id="means-chart">${means}<figcaption>Means per hectare with their 95 % confidence intervals: the whole region (dark) and each forest type. Wide intervals come from few plots.</figcaption></figure>` : null}
  ${guilds ? html`<figure id="guild-chart">${guilds}<figcaption>Guild composition: the mean share of live basal area per plot.</figcaption></figure>` : null}
  ${input.plots ? html`<h2 id="where">Where the plots are</h2>${input.plots.map}` : null}
  <h2>Diversity and disturbance by forest type</h2>
  ${plotSizeNote(s.payload.plot_sizes)}
  ${fitsSection(s)}
  <h2>Estimates by forest type</h2>
  ${estimatesTable(withoutChange(summary.rows))}
  ${cautionLegend(summary.caution)}
  <h2 id="change-between-visits">Change between visits</h2>
  ${changeSection({ rows: summary.rows, coverage: s.payload.change, chartSvg: charts.change, scope: 'region' })}
  ${carbonUncertaintySection(s.payload.carbon_change_uncertainty, 'Whole region (stratified)')}
  ${carbonUncertaintySection(s.payload.tree_carbon_change_uncertainty, 'Whole region (stratified)')}
  <h2 id="stand-table-heading">Stand table by diameter class</h2>
  ${standTableSection(summary.rows, 'Whole region (stratified)') ?? html`<p class="muted">No stand table in this version of the summary.</p>`}
  ${biomassMethodSection(s.payload.biomass_method)}
  <h2>Guild composition</h2>
  ${guildTable(s) ?? html`<p class="muted">No guild shares.</p>`}
  <h2>Plots by disturbance class</h2>
  ${disturbanceTable(s) ?? html`<p class="muted">No disturbance index.</p>`}
  <h2>Species recorded (pooled counts)</h2>
  ${speciesTable(s) ?? html`<p class="muted">No species names.</p>`}
  ${input.plots ? html`<h2 id="plots">Plots</h2>${input.plots.table}` : null}
  <h2>Method and notes</h2>
  <ul class="notes">
    <li>${method.estimator}</li>
    <li>${method.biomass}</li>
    <li>${method.carbon}</li>
    <li>${method.fits}</li>
    ${summary.notes.filter((n) => n.code !== 'caution').map((n) => html`<li>${n.message}</li>`)}
  </ul>
  <h2 class="no-print">Downloads</h2>
  <p class="downloads no-print">
    <a href="${links.summaryCsv}" download>Summary (CSV)</a>
    <a href="${links.summaryJson}">Summary (JSON)</a>
    <a href="${links.plotsGeoJson}">Plots with metrics (GeoJSON)</a>
  </p>
  ${whatChangedSection(input.changes)}
  <h2>Versions of this summary</h2>
  ${versionsList(input)}
</main>
<footer><div>Made by stemwise from the plots loaded up to the summary's date.${links.signOut ? html` <a class="no-print" href="${links.signOut}">Sign out</a>` : null}</div></footer>`;
  return pageShell(`Region ${s.region} · forest inventory summary`, body);
}
