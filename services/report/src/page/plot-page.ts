import { REGION_CHANGE_COLUMNS, type HeightModelRow, type PlotChangeRow, type PlotVisitRow, type RegionPlot } from '@stemwise/db';
import { classWords, DEFAULT_WOOD_DENSITY, PLOT_METRICS, variableLabel, type PlotDiagnostics, type ResolutionLevel } from '@stemwise/core';
import type { DiameterClassFigures } from '@stemwise/core/charts';
import { figure, isoDate, percentOfShare } from './figures';
import { html, safeSvg, type Markup } from './html';
import { pageShell } from './shell';

// The page of one plot: where it is, its visits, its figures per visit (catalogue labels and units), the
// diameter distribution and species of the visit shown, how its biomass was estimated, and its change
// between visits once it has been measured twice.

/** Live stems of one accepted species (or of one name that is not a listed species). */
export interface SpeciesLine {
  /** Accepted name; null when the recorded name is not a listed species. */
  accepted: string | null;
  /** Names recorded in the field that differ from the accepted one (synonyms, spellings), or the unresolved name. */
  recorded: string[];
  family: string | null;
  guild: string | null;
  level: ResolutionLevel;
  woodDensity: number | null;
  stems: number;
  basalAreaM2Ha: number;
}

/** A diameter class of the plot with its figures and the live stems recorded in it. */
export interface PlotDiameterClass extends DiameterClassFigures {
  stems: number;
}

export interface PlotPageData {
  region: string;
  plot: RegionPlot;
  visits: PlotVisitRow[];
  changes: PlotChangeRow[];
  /** The visit whose stems are shown (the latest computed, else the latest); null without visits. */
  shown: PlotVisitRow | null;
  classes: PlotDiameterClass[];
  diameterSvg: string | null;
  species: SpeciesLine[];
  heightModel: HeightModelRow | null;
}

export interface PlotPageLinks {
  index: string;
  region: string;
  signOut: string | null;
}

const GUILD_WORDS: Record<string, string> = { pioneer: 'pioneer', light_demander: 'light-demanding', shade_tolerant: 'shade-tolerant' };
const LEVEL_WORDS: Partial<Record<ResolutionLevel, string>> = { genus: 'genus only', unidentified: 'not identified', unresolved: 'not in the species list' };

const degrees = (v: number, pos: string, neg: string): string => `${Math.abs(v).toFixed(5)}° ${v < 0 ? neg : pos}`;
const withUnit = (v: string): Markup => {
  const l = variableLabel(v);
  return html`${l.name}${l.unit ? html` <span class="muted">(${l.unit})</span>` : null}`;
};

const stemWord = (n: number, one: string, many: string): string => `${n} ${n === 1 ? one : many}`;

function visitsTable(visits: readonly PlotVisitRow[]): Markup {
  return html`<table id="plot-visits"><thead><tr><th>Survey date</th><th>Plot</th><th>Subplot</th><th>Logging · fire class</th><th>Stems recorded</th><th>Figures</th></tr></thead><tbody>${visits.map(
    (v) => html`<tr><td class="nowrap">${v.surveyDate}</td><td>${figure(v.areaHa)} ha, dbh ≥ ${figure(v.dbhMinCm)} cm</td><td>${v.subplotAreaHa > 0 ? `${figure(v.subplotAreaHa)} ha, dbh ≥ ${figure(v.subplotDbhMinCm)} cm` : 'none'}</td><td>${v.loggingClass} · ${v.fireClass}</td><td>${stemWord(v.stems.live, 'live', 'live')} · ${stemWord(v.stems.dead, 'dead', 'dead')} · ${stemWord(v.stems.stump, 'stump', 'stumps')}</td><td>${v.computedAt ? `computed ${isoDate(v.computedAt)}${v.stale ? '; to be computed again' : ''}` : 'not computed yet'}</td></tr>`,
  )}</tbody></table>`;
}

function figuresTable(visits: readonly PlotVisitRow[]): Markup {
  const computed = visits.filter((v) => v.metrics !== null);
  if (!computed.length) return html`<p class="muted">No visit of this plot is computed yet: the figures appear after the next recompute.</p>`;
  return html`<div class="table-scroll"><table id="plot-figures"><thead><tr><th>Figure</th>${computed.map((v) => html`<th class="num">${v.surveyDate}</th>`)}</tr></thead><tbody>${PLOT_METRICS.map(
    (m) => html`<tr data-variable="${m.column}"><td title="${m.description}">${withUnit(m.column)}</td>${computed.map((v) => html`<td class="num">${figure(v.metrics?.[m.column as keyof NonNullable<PlotVisitRow['metrics']>])}</td>`)}</tr>`,
  )}</tbody></table></div>
<p class="muted">Rounded to three significant figures; <code>export plots</code> keeps full precision. Biomass and carbon are model estimates (see how they were estimated below).</p>`;
}

function classTable(classes: readonly PlotDiameterClass[]): Markup {
  return html`<table id="diameter-classes"><thead><tr><th>Diameter class</th><th class="num">Live stems recorded</th><th class="num">${withUnit('stems_ha')}</th><th class="num">${withUnit('basal_area_m2_ha')}</th></tr></thead><tbody>${classes.map(
    (c) => html`<tr><td>${classWords(c.lowerCm, c.upperCm)}</td><td class="num">${c.stems}</td><td class="num">${figure(c.stemsHa)}</td><td class="num">${figure(c.basalAreaM2Ha)}</td></tr>`,
  )}</tbody></table>`;
}

function speciesTable(lines: readonly SpeciesLine[]): Markup {
  if (!lines.length) return html`<p class="muted">No live stem in this visit.</p>`;
  return html`<table id="plot-species"><thead><tr><th>Species</th><th>Recorded as</th><th>Family</th><th>Guild</th><th class="num">Wood density (g/cm³)</th><th class="num">Live stems</th><th class="num">${withUnit('basal_area_m2_ha')}</th></tr></thead><tbody>${lines.map(
    (l) => html`<tr><td>${l.accepted ? html`<i>${l.accepted}</i>` : html`<span class="muted">${LEVEL_WORDS[l.level] ?? l.level}</span>`}</td><td>${l.recorded.join(', ') || '–'}</td><td>${l.family ?? '–'}</td><td>${l.guild ? (GUILD_WORDS[l.guild] ?? l.guild) : 'unassigned'}</td><td class="num">${figure(l.woodDensity)}</td><td class="num">${l.stems}</td><td class="num">${figure(l.basalAreaM2Ha)}</td></tr>`,
  )}</tbody></table>
<p class="muted">Live stems of the main plot and subplot at or above their minimum diameter; names resolved against the current species list (synonyms counted as their accepted species). The diversity figures use the identified stems of the main plot only.</p>`;
}

const WD_WORDS: ReadonlyArray<readonly [keyof NonNullable<PlotDiagnostics['woodDensityBaShare']>, string]> = [
  ['species', 'the species’ own value'],
  ['genus', 'the mean of its genus'],
  ['family', 'the mean of its family'],
  ['plot', 'the plot’s mean'],
  ['default', `the default ${DEFAULT_WOOD_DENSITY} g/cm³ (or the configured one)`],
];

function biomassMethod(d: PlotVisitRow['diagnostics'], model: HeightModelRow | null, forestType: string): Markup {
  const diag = (d ?? {}) as Partial<PlotDiagnostics> & { heightModelHeights?: number | null };
  const h = diag.heightSourceShare;
  const wd = diag.woodDensityBaShare;
  const stats = (model?.stats ?? {}) as { n?: number; r2?: number | null; dbhMinCm?: number; dbhMaxCm?: number };
  return html`<ul id="biomass-method">
  <li>Heights of live stems: ${h ? html`<b>${percentOfShare(h.measured)}</b> measured, <b>${percentOfShare(h.modelled)}</b> from the local height–diameter model, <b>${percentOfShare(h.noHeightModel)}</b> without a height` : 'no live stem'}.</li>
  <li>Equation: Chave et al. 2014 (wood density, diameter and height) for stems with a measured or modelled height; Chave et al. 2005 for the climate class of the forest type where no height is available.</li>
  <li>Height model of forest type ${forestType}: ${model ? html`${model.form}, fitted on ${stats.n ?? diag.heightModelHeights ?? '–'} measured heights${stats.dbhMinCm !== undefined ? ` of stems ${figure(stats.dbhMinCm)}–${figure(stats.dbhMaxCm)} cm` : ''}${stats.r2 != null ? `, R² ${figure(stats.r2)}` : ''}` : 'none stored (too few measured heights in this forest type)'}.${diag.modelledOutsideFitRange ? ` ${diag.modelledOutsideFitRange} stems got a modelled height outside the diameter range the model was fitted on.` : ''}</li>
  <li>Wood density, as shares of live basal area: ${wd ? WD_WORDS.filter(([k]) => wd[k] > 0).map(([k, words], i) => html`${i ? '; ' : ''}<b>${percentOfShare(wd[k])}</b> from ${words}`) : 'no live basal area'}.</li>
  ${diag.liveStemsBelowDbhMin ? html`<li>${diag.liveStemsBelowDbhMin} live stems below the minimum diameter of the area they were recorded on are left out of every figure.</li>` : null}
  ${diag.unresolvedNames?.length ? html`<li>Names not matched to a listed species: ${diag.unresolvedNames.map((u, i) => html`${i ? ', ' : ''}${u.name} (${u.stems})`)}.</li>` : null}
</ul>`;
}

// Mortality and recruitment are shares of trees per year: shown as per cent per year.
const ANNUAL_SHARES = new Set<string>(['mortality_annual', 'recruitment_annual']);
const percentPerYear = (x: number | null): string => (x === null ? '–' : `${figure(100 * x)} %/yr`);

function changeSection(changes: readonly PlotChangeRow[]): Markup {
  if (!changes.length) return html`<p class="muted" id="plot-change">Measured once so far: the change between visits appears here after the plot is measured again.</p>`;
  return html`<div class="table-scroll"><table id="plot-change"><thead><tr><th>Figure</th>${changes.map((c) => html`<th class="num">${c.dateFrom} → ${c.dateTo}</th>`)}</tr></thead><tbody>
<tr><td>Years between the visits</td>${changes.map((c) => html`<td class="num">${figure(c.values.years)}</td>`)}</tr>
<tr><td>Trees at the first visit · died · removed · recruits</td>${changes.map((c) => html`<td class="num">${c.values.n_start ?? '–'} · ${c.values.n_died ?? '–'} · ${c.values.n_removed ?? '–'} · ${c.values.n_recruits ?? '–'}</td>`)}</tr>
${REGION_CHANGE_COLUMNS.map((v) => html`<tr data-variable="${v}"><td>${withUnit(v)}</td>${changes.map((c) => html`<td class="num">${ANNUAL_SHARES.has(v) ? percentPerYear(c.values[v]) : figure(c.values[v])}</td>`)}</tr>`)}
</tbody></table></div>
<p class="muted">Trees matched by tree id between consecutive visits, at the larger of the two minimum diameters (docs/methods.md, change between visits).</p>`;
}

export function renderPlotPage(d: PlotPageData, links: PlotPageLinks): string {
  const { plot, shown } = d;
  const chart = safeSvg(d.diameterSvg);
  const body = html`
<header class="top"><div>
  <div class="where"><a href="${links.index}">stemwise</a> · <a href="${links.region}">region ${d.region}</a></div>
  <h1>Plot ${plot.plotKey}</h1>
</div></header>
<main>
  <div class="facts" id="plot-facts">
    <span>region <b>${d.region}</b></span>
    <span>forest type <b>${plot.forestType}</b></span>
    <span>at <b>${degrees(plot.latitude, 'N', 'S')}, ${degrees(plot.longitude, 'E', 'W')}</b> (WGS 84)</span>
    <span>elevation <b>${plot.elevationM === null ? 'not recorded' : `${figure(plot.elevationM)} m`}</b></span>
    <span><b>${d.visits.length}</b> ${d.visits.length === 1 ? 'visit' : 'visits'}</span>
  </div>
  <p class="caution">The figures of one plot describe that plot only: a region's figures come from many plots with their sampling error (see the region page). Biomass and carbon are model estimates; this page is no logging plan.</p>
  <h2>Visits</h2>
  ${visitsTable(d.visits)}
  <h2>Figures per visit</h2>
  ${figuresTable(d.visits)}
  <h2>Diameter distribution${shown ? `, visit of ${shown.surveyDate}` : ''}</h2>
  ${chart ? html`<figure id="diameter-chart">${chart}<figcaption>Live stems per hectare and basal area per hectare by diameter class; the classes of the region's stand tables, with stems below the reporting threshold (measured on a subplot) in a class of their own.</figcaption></figure>${classTable(d.classes)}` : html`<p class="muted">No live stem to draw.</p>`}
  <h2>Species${shown ? `, visit of ${shown.surveyDate}` : ''}</h2>
  ${speciesTable(d.species)}
  <h2>How the biomass was estimated${shown ? `, visit of ${shown.surveyDate}` : ''}</h2>
  ${shown?.diagnostics ? biomassMethod(shown.diagnostics, d.heightModel, plot.forestType) : html`<p class="muted">Not computed yet.</p>`}
  <h2>Change between visits</h2>
  ${changeSection(d.changes)}
</main>
<footer><div>Made by stemwise from the plot's stored visits.${links.signOut ? html` <a class="no-print" href="${links.signOut}">Sign out</a>` : null}</div></footer>`;
  return pageShell(`Plot ${plot.plotKey} · region ${d.region}`, body);
}
