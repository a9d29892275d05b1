import type { SummaryNote, Weighting } from '@stemwise/core';
import { fmtHa, note } from './notes';

export interface ResolvedAreas {
  readonly weighting: Weighting;
  /** Area (ha) of each forest type with plots, null where unknown or 0. */
  readonly areas: Readonly<Record<string, number | null>>;
  readonly notes: readonly SummaryNote[];
}

// Decides the weighting: W_h = A_h / A when every forest type with plots has a positive area, else
// W_h = n_h / n for the whole region (mixing the two would weight strata on different footings).
export function resolveForestAreas(forestTypes: readonly string[], forestAreas: Readonly<Record<string, number>>): ResolvedAreas {
  const areas: Record<string, number | null> = {};
  const missing: string[] = [];
  const notes: SummaryNote[] = [];
  for (const t of forestTypes) {
    const a = Object.hasOwn(forestAreas, t) ? forestAreas[t] : undefined;
    if (a !== undefined && a > 0) {
      areas[t] = a;
      continue;
    }
    areas[t] = null;
    missing.push(t);
    if (a === 0) notes.push(note('area_zero_with_plots', `Forest type '${t}' has plots but a forest area of 0 ha; its area is treated as unknown.`, t));
  }
  const withPlots = new Set(forestTypes);
  for (const [t, a] of Object.entries(forestAreas)) {
    if (!withPlots.has(t) && a > 0) {
      notes.push(note('unsampled_area', `Forest type '${t}' (${fmtHa(a)}) has no plot in this region; region estimates and totals do not cover it.`, t));
    }
  }
  const known = forestTypes.length - missing.length;
  if (forestTypes.length > 0 && missing.length === 0) {
    notes.unshift(note('weights_area', 'Forest types are weighted by forest area (W_h = A_h / A).'));
    return { weighting: 'area', areas, notes };
  }
  if (known === 0) {
    notes.unshift(note('weights_plot_count', 'No forest areas: forest types are weighted by plot counts (W_h = n_h / n), which assumes plots were placed in proportion to area; no region totals.'));
  } else {
    notes.unshift(
      note('areas_incomplete', `No forest area for ${missing.map((t) => `'${t}'`).join(', ')}: the whole region is weighted by plot counts (W_h = n_h / n), which assumes plots were placed in proportion to area; no region totals, forest-type totals where the area is known.`),
    );
  }
  return { weighting: 'plot_count', areas, notes };
}
