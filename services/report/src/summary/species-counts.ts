import type { PlotMetrics } from './input';
import { WHOLE_REGION, type SpeciesCountRow } from '@stemwise/core';

// S = |⋃ names| per forest type and for the region: observed species counts (names trimmed; empty names ignored).
export function countSpecies(plots: readonly PlotMetrics[], forestTypes: readonly string[]): SpeciesCountRow[] | null {
  const region = new Set<string>();
  const byType = new Map<string, { names: Set<string>; plots: number }>(forestTypes.map((t) => [t, { names: new Set(), plots: 0 }]));
  let withNames = 0;
  for (const p of plots) {
    if (p.speciesNames === undefined) continue;
    withNames++;
    const entry = byType.get(p.forestType);
    if (entry === undefined) continue;
    entry.plots++;
    for (const raw of p.speciesNames) {
      const name = raw.trim();
      if (name === '') continue;
      entry.names.add(name);
      region.add(name);
    }
  }
  if (withNames === 0) return null;
  return [
    { forest_type: WHOLE_REGION, n_species: region.size, n_plots_with_names: withNames },
    ...forestTypes.map((t) => {
      const e = byType.get(t) as { names: Set<string>; plots: number };
      return { forest_type: t, n_species: e.names.size, n_plots_with_names: e.plots };
    }),
  ];
}
