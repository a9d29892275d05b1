import { variableLabel } from '@stemwise/core';
import { html, safeSvg, type Markup } from './html';

// The plot map of a page: a choice of the variable that colours the plots (a plain GET form: the pages
// run no script), the map itself, and a caption that says what it shows.

export interface MapSectionInput {
  /** The map's SVG (plotMapSvg); null when there is no plot to draw. */
  readonly svg: string | null;
  readonly variable: string;
  /** The variables offered; null: no choice (the static report, which has no server to ask). */
  readonly choices: readonly string[] | null;
  /** Query parameters of the page to keep when another variable is chosen (version, sort…). */
  readonly keep?: Readonly<Record<string, string | undefined>>;
  /** What the points are, for the caption. */
  readonly what: string;
  /** Whether a click on a point opens the plot's page. */
  readonly linked: boolean;
}

/** The query parameter that names the map's variable. */
export const MAP_PARAM = 'colour';

const labelled = (v: string): string => {
  const l = variableLabel(v);
  return l.unit ? `${l.name} (${l.unit})` : l.name;
};

export function mapSection(input: MapSectionInput): Markup {
  const svg = safeSvg(input.svg);
  const choose = input.choices
    ? html`<form class="map-choice no-print" method="get" action="#plot-map">
  <label for="map-variable">Colour the plots by</label>
  <select id="map-variable" name="${MAP_PARAM}">${input.choices.map((v) => html`<option value="${v}"${v === input.variable ? html` selected` : null}>${labelled(v)}</option>`)}</select>
  ${Object.entries(input.keep ?? {}).map(([k, v]) => (v === undefined ? null : html`<input type="hidden" name="${k}" value="${v}">`))}
  <button type="submit">Show</button>
</form>`
    : null;
  if (!svg) return html`<section id="plot-map-section">${choose}<p class="muted" id="plot-map">No computed plot to draw on the map yet.</p></section>`;
  return html`<section id="plot-map-section">${choose}
<figure id="plot-map" data-variable="${input.variable}">${svg}<figcaption>${input.what} at their recorded coordinates (WGS 84), coloured by ${labelled(input.variable)} of the latest computed visit; hollow circles: plots without a value.${input.linked ? ' Select a point to open its plot page.' : ''} No base map is drawn: rivers, roads and boundaries are not shown.</figcaption></figure>
</section>`;
}
