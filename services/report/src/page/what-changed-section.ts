import { variableLabel } from '@stemwise/core';
import type { SummaryChanges } from '../summary/summary-changes';
import { estimate, standardError } from './figures';
import { html, type Markup } from './html';

// "What changed since the previous version" on a region page: plots added and removed, and the
// estimates that moved by more than their standard error (docs/methods.md#what-changed-between-versions).

const WHOLE = 'all';
const MAX_KEYS = 20;

function keyList(what: string, keys: readonly string[] | null): Markup {
  if (keys === null) return html`<li>${what}: not known (the earlier version was made before plot lists were kept).</li>`;
  if (!keys.length) return html`<li>${what}: none.</li>`;
  const shown = keys.slice(0, MAX_KEYS).join(', ');
  return html`<li>${what} (${keys.length}): ${shown}${keys.length > MAX_KEYS ? ` and ${keys.length - MAX_KEYS} more` : ''}.</li>`;
}

export function whatChangedSection(changes: SummaryChanges | null | undefined): Markup | null {
  if (!changes) return null;
  if (changes.previous_version === null) {
    return html`<section id="what-changed"><h2>What changed</h2><p class="muted">This is the first version of this summary.</p></section>`;
  }
  const moved = changes.moved;
  return html`<section id="what-changed"><h2>What changed since version ${changes.previous_version}</h2>
<ul>${keyList('Plots added', changes.plots_added)}${keyList('Plots removed', changes.plots_removed)}</ul>
${
  moved.length
    ? html`<table id="moved-estimates"><thead><tr><th>Variable</th><th>Stratum</th><th class="num">Version ${changes.previous_version}</th><th class="num">Version ${changes.version}</th><th class="num">SE (now)</th></tr></thead><tbody>${moved.map((m) => {
        const label = variableLabel(m.variable);
        return html`<tr><td>${label.name}${label.unit ? html` <span class="muted">(${label.unit})</span>` : null}</td><td>${m.forest_type === WHOLE ? 'Whole region' : m.forest_type}</td><td class="num">${estimate(m.old_mean, m.se)}</td><td class="num">${estimate(m.new_mean, m.se)}</td><td class="num">${standardError(m.se)}</td></tr>`;
      })}</tbody></table>`
    : html`<p>No estimate moved by more than its standard error.</p>`
}
<p class="muted">Listed: estimates whose mean moved by more than the standard error of the new estimate. Smaller moves are within sampling noise and not listed.</p></section>`;
}
