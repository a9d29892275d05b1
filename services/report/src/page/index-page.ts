import { cautions } from './region-page';
import { isoMinute } from './figures';
import { html } from './html';
import { pageShell } from './shell';

export interface IndexEntry {
  region: string;
  plots: number;
  version: number | null;
  updatedAt: Date | null;
  /** Link to the region's page; null when it has no summary yet. */
  href: string | null;
}

/** The list of regions the viewer may see. */
export function renderIndexPage(entries: readonly IndexEntry[], options: { carbonFraction: number; signOut: string | null }): string {
  const body = html`
<header class="top"><div>
  <div class="where">stemwise</div>
  <h1>Regional forest inventory summaries</h1>
</div></header>
<main>
  ${cautions(options.carbonFraction)}
  <h2>Regions</h2>
  ${entries.length
    ? html`<table class="regions" id="regions"><thead><tr><th>Region</th><th class="num">Plots</th><th class="num">Summary version</th><th>Assembled</th></tr></thead><tbody>${entries.map(
        (e) => html`<tr><td>${e.href ? html`<a href="${e.href}">${e.region}</a>` : e.region}</td><td class="num">${e.plots}</td><td class="num">${e.version ?? '–'}</td><td>${e.updatedAt ? isoMinute(e.updatedAt) : 'not yet: waiting for the next recompute'}</td></tr>`,
      )}</tbody></table>`
    : html`<p>No region to show: none has been loaded yet, or this token may see none.</p>`}
</main>
<footer><div>${options.signOut ? html`<a class="no-print" href="${options.signOut}">Sign out</a>` : null}</div></footer>`;
  return pageShell('Regional forest inventory summaries', body);
}
