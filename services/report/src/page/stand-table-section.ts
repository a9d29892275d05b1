// The stand table of a region or of the nation: stems, basal area and biomass per hectare by diameter
// class, each the stratified estimate over the plots that measured the class (docs/methods.md#stand-tables).
import { classWords, parseStandVariable, STAND_FIGURES, WHOLE_REGION, type RegionRow, type StandVariable } from '@stemwise/core';
import { estimate, estimateInterval } from './figures';
import { html, type Markup } from './html';
import { cautionMark } from './region-page';

interface ClassRows {
  readonly lowerCm: number;
  readonly upperCm: number | null;
  readonly byFigure: ReadonlyMap<string, RegionRow>;
}

function classesOf(rows: readonly RegionRow[], stratum: string): ClassRows[] {
  const byClass = new Map<string, { lowerCm: number; upperCm: number | null; byFigure: Map<string, RegionRow> }>();
  for (const r of rows) {
    if (r.forest_type !== stratum) continue;
    const v: StandVariable | null = parseStandVariable(r.variable);
    if (v === null) continue;
    const key = `${v.lowerCm}/${v.upperCm}`;
    let c = byClass.get(key);
    if (c === undefined) byClass.set(key, (c = { lowerCm: v.lowerCm, upperCm: v.upperCm, byFigure: new Map() }));
    c.byFigure.set(v.figure, r);
  }
  return [...byClass.values()].sort((a, b) => a.lowerCm - b.lowerCm);
}

function cell(r: RegionRow | undefined): Markup {
  if (r === undefined || r.mean === null) return html`<td class="num">–</td><td class="num">–</td>`;
  return html`<td class="num">${estimate(r.mean, r.se)}${cautionMark(r)}</td><td class="num muted">${estimateInterval(r.ci_low, r.ci_high, r.se)}</td>`;
}

function table(classes: readonly ClassRows[], id: string | null): Markup {
  return html`<div class="table-scroll"><table${id ? html` id="${id}"` : null} class="stand-table"><thead><tr><th>Diameter class</th><th class="num">Plots</th>${STAND_FIGURES.map(
    (f) => html`<th class="num">${f.name} (${f.unit})</th><th class="num">95 % CI</th>`,
  )}</tr></thead><tbody>${classes.map((c) => {
    const n = c.byFigure.get(STAND_FIGURES[0].key)?.n_plots ?? 0;
    return html`<tr><td>${classWords(c.lowerCm, c.upperCm)}</td><td class="num">${n}</td>${STAND_FIGURES.map((f) => cell(c.byFigure.get(f.key)))}</tr>`;
  })}</tbody></table></div>`;
}

/**
 * The stand table of the whole (region or nation) and, folded, of each forest type; null when the
 * summary has no stand-table rows (made before them).
 */
export function standTableSection(rows: readonly RegionRow[], wholeLabel: string): Markup | null {
  const whole = classesOf(rows, WHOLE_REGION);
  if (whole.length === 0) return null;
  const types = [...new Set(rows.filter((r) => r.forest_type !== WHOLE_REGION && parseStandVariable(r.variable) !== null).map((r) => r.forest_type))].sort();
  const threshold = whole[0].lowerCm;
  return html`<section id="stand-table-section">
  <p class="muted">${wholeLabel}: live stems per hectare, basal area and above-ground biomass by 10 cm diameter class from the reporting threshold (${threshold} cm). Each class is estimated only from the plots that measured every stem of the class (plots with a larger diameter minimum are left out of it, hence the plot counts); classes add up to the figures from the threshold up only where the same plots measured them all. Biomass is a model estimate; the intervals cover sampling error only.</p>
  ${table(whole, 'stand-table')}
  ${types.map((t) => html`<details class="stand-table-type"><summary>Forest type ${t}</summary>${table(classesOf(rows, t), null)}</details>`)}
</section>`;
}

/** The sentence under the headline cards that says from which diameter their stems count; null without stand-table rows. */
export function reportingThresholdNote(rows: readonly RegionRow[]): Markup | null {
  const whole = classesOf(rows, WHOLE_REGION);
  if (whole.length === 0) return null;
  return html`<p class="muted" id="reporting-threshold">Stems, basal area, biomass and carbon count live stems from ${whole[0].lowerCm} cm diameter up (the reporting threshold), so that plots measured from different diameters compare; plots measured only from a larger diameter are left out of them (see the notes). The downloads also give the figures of every stem measured.</p>`;
}
