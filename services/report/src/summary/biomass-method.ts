import { WHOLE_REGION } from '@stemwise/core';
import type { PlotMetrics } from './input';

// How a region's biomass was computed: the share of its above-ground biomass from each height source
// and each wood-density level (docs/methods.md#biomass-method-shares). Each plot gives its AGB per
// hectare and its own shares (columns agb_height_*_share, agb_wd_*_share of `export plots`); a stratum's
// share is Σ share_p · AGB_p / Σ AGB_p over its plots: the share of the plots' summed AGB per hectare,
// each plot weighing by its biomass, not a stratified estimate and without an interval.

export const BIOMASS_METHOD_COLUMNS = {
  height_measured: 'agb_height_measured_share',
  height_modelled: 'agb_height_modelled_share',
  no_height: 'agb_no_height_share',
  wd_species: 'agb_wd_species_share',
  wd_genus: 'agb_wd_genus_share',
  wd_family: 'agb_wd_family_share',
  wd_plot: 'agb_wd_plot_share',
  wd_default: 'agb_wd_default_share',
} as const;

export type BiomassMethodPart = keyof typeof BIOMASS_METHOD_COLUMNS;

/** One stratum (a forest type, or `all` for every plot of the scope): shares 0–1 of the plots' summed AGB per hectare. */
export type BiomassMethodRow = { readonly forest_type: string; readonly n_plots: number; readonly agb_mg_ha_sum: number } & {
  readonly [K in BiomassMethodPart]: number | null;
};

const PARTS = Object.keys(BIOMASS_METHOD_COLUMNS) as BiomassMethodPart[];

/**
 * The plots that count in the shares (AGB > 0 and every share known), in plot order, column by column:
 * forest type, AGB per hectare and each share. The parts of several regions joined in region order give
 * the shares of all their plots to the last bit (the sums run in the same order).
 */
export interface BiomassParts {
  readonly forest_type: readonly string[];
  readonly agb_mg_ha: readonly number[];
  readonly shares: Readonly<Record<BiomassMethodPart, readonly number[]>>;
}

/** The parts of the shares of `plots` (in their order). */
export function biomassParts(plots: readonly PlotMetrics[]): BiomassParts {
  const forest_type: string[] = [];
  const agb_mg_ha: number[] = [];
  const shares = Object.fromEntries(PARTS.map((k) => [k, [] as number[]])) as Record<BiomassMethodPart, number[]>;
  for (const p of plots) {
    const agb = p.values.agb_mg_ha;
    if (typeof agb !== 'number' || !(agb > 0)) continue;
    if (PARTS.some((k) => typeof p.values[BIOMASS_METHOD_COLUMNS[k]] !== 'number')) continue;
    forest_type.push(p.forestType);
    agb_mg_ha.push(agb);
    for (const k of PARTS) shares[k].push(p.values[BIOMASS_METHOD_COLUMNS[k]] as number);
  }
  return { forest_type, agb_mg_ha, shares };
}

/** The parts of several sets of plots together, in the order given. */
export function joinBiomassParts(parts: readonly BiomassParts[]): BiomassParts {
  return {
    forest_type: parts.flatMap((p) => p.forest_type),
    agb_mg_ha: parts.flatMap((p) => p.agb_mg_ha),
    shares: Object.fromEntries(PARTS.map((k) => [k, parts.flatMap((p) => p.shares[k])])) as Record<BiomassMethodPart, number[]>,
  };
}

// Σ share_p · AGB_p / Σ AGB_p over the plots of the parts (those with AGB > 0 and every share known), of one forest type or (null) all.
function pooled(label: string, forestType: string | null, parts: BiomassParts): BiomassMethodRow {
  let total = 0;
  let n = 0;
  const sums = Object.fromEntries(PARTS.map((k) => [k, 0])) as Record<BiomassMethodPart, number>;
  for (let i = 0; i < parts.agb_mg_ha.length; i++) {
    if (forestType !== null && parts.forest_type[i] !== forestType) continue;
    const agb = parts.agb_mg_ha[i];
    n++;
    total += agb;
    for (const k of PARTS) sums[k] += parts.shares[k][i] * agb;
  }
  const shares = Object.fromEntries(PARTS.map((k) => [k, total > 0 ? sums[k] / total : null])) as Record<BiomassMethodPart, number | null>;
  return { forest_type: label, n_plots: n, agb_mg_ha_sum: total, ...shares };
}

/** The biomass method shares of every forest type of `forestTypes` and of all plots together (`all`, first), from the parts. */
export function sharesOf(parts: BiomassParts, forestTypes: readonly string[]): BiomassMethodRow[] {
  return [pooled(WHOLE_REGION, null, parts), ...[...new Set(forestTypes)].sort().map((t) => pooled(t, t, parts))];
}

/** The biomass method shares of every forest type and of all plots together (`all`, first); plots without AGB or shares are left out. */
export function biomassMethodShares(plots: readonly PlotMetrics[]): BiomassMethodRow[] {
  return sharesOf(biomassParts(plots), plots.map((p) => p.forestType));
}
