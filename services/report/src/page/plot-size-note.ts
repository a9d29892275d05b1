import type { PlotSize } from '../snapshot-payload';
import { figure } from './figures';
import { html, type Markup } from './html';

// A sentence where plot sizes differ in a region: species counts grow with the area sampled, so the
// diversity figures compare plots of different sizes only through a size-fair measure
// (docs/methods.md#plots-of-different-sizes).

/** The note, or null when every plot of the region has the same area (or sizes are unknown). */
export function plotSizeNote(sizes: readonly PlotSize[] | undefined): Markup | null {
  if (!sizes || !sizes.length) return null;
  const byArea = new Map<number, number>();
  for (const s of sizes) byArea.set(s.area_ha, (byArea.get(s.area_ha) ?? 0) + s.n_plots);
  if (byArea.size < 2) return null;
  const list = [...byArea.entries()].sort((a, b) => a[0] - b[0]).map(([a, n]) => `${n} of ${figure(a)} ha`).join(', ');
  return html`<p class="caution plot-sizes">Plots here differ in size (${list}). Species counts grow with the area sampled, so richness is not comparable between them; Fisher's α (the diversity of the charts and tables) depends much less on plot size, and the expected species among 50 stems (rarefied richness, column <code>rarefied_50</code>) is the size-fair measure.</p>`;
}
