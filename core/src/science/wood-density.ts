// Basic wood density ρ (g/cm³) of each stem, filled from the most specific level available:
// species value, else the mean of its genus in the reference list, else of its family, else the
// basal-area-weighted mean of the plot's stems that got one of those, else a regional default.
// Taxonomic gap-filling of this kind is common practice in tropical biomass work (no single source).
// Formulas, sources and check values: docs/methods.md#wood-density-fallback.

import { SpeciesIndex, type SpeciesResolution } from './species-names';

export type WoodDensityLevel = 'species' | 'genus' | 'family' | 'plot' | 'default';
export const WOOD_DENSITY_LEVELS: readonly WoodDensityLevel[] = ['species', 'genus', 'family', 'plot', 'default'];

/**
 * Regional default, g/cm³: 0.58 from memory (not verified against a source) — the order of commonly
 * quoted mean basic wood densities of tropical trees. It is a setting: give a regional value.
 */
export const DEFAULT_WOOD_DENSITY = 0.58;

export interface WoodDensityHit {
  readonly value: number;
  readonly level: 'species' | 'genus' | 'family';
}

function meansBy(groups: Map<string, { sum: number; n: number }>): Map<string, number> {
  const out = new Map<string, number>();
  for (const [key, { sum, n }] of groups) out.set(key, sum / n);
  return out;
}

/** Species values and genus and family means of a reference list; lookups cached per resolution. */
export class WoodDensityTable {
  private readonly genusMean: Map<string, number>;
  private readonly familyMean: Map<string, number>;
  private readonly cache = new Map<SpeciesResolution, WoodDensityHit | null>();

  // ρ̄_genus = mean of the species values of the genus, ρ̄_family likewise (reference-list means)
  constructor(index: SpeciesIndex) {
    const genus = new Map<string, { sum: number; n: number }>();
    const family = new Map<string, { sum: number; n: number }>();
    for (const row of index.species) {
      if (row.woodDensity === null) continue;
      for (const [map, key] of [[genus, SpeciesIndex.genusOfName(row.name)], [family, row.family]] as const) {
        const acc = map.get(key) ?? { sum: 0, n: 0 };
        acc.sum += row.woodDensity;
        acc.n += 1;
        map.set(key, acc);
      }
    }
    this.genusMean = meansBy(genus);
    this.familyMean = meansBy(family);
  }

  /** ρ of a resolved name from the reference list (species, genus or family level), or null. */
  lookup(resolution: SpeciesResolution): WoodDensityHit | null {
    const cached = this.cache.get(resolution);
    if (cached !== undefined) return cached;
    let hit: WoodDensityHit | null = null;
    const wd = resolution.species?.woodDensity ?? null;
    if (wd !== null) hit = { value: wd, level: 'species' };
    else if (resolution.genus !== null && this.genusMean.has(resolution.genus)) {
      hit = { value: this.genusMean.get(resolution.genus) as number, level: 'genus' };
    } else if (resolution.family !== null && this.familyMean.has(resolution.family)) {
      hit = { value: this.familyMean.get(resolution.family) as number, level: 'family' };
    }
    if (hit !== null) Object.freeze(hit);
    this.cache.set(resolution, hit);
    return hit;
  }
}

export interface StemWoodDensities {
  readonly values: number[];
  readonly levels: WoodDensityLevel[];
}

// ρ_plot = Σ gᵢ ρᵢ / Σ gᵢ over stems with a reference value, else the default — plot fallback (common practice)
export function stemWoodDensities(
  hits: readonly (WoodDensityHit | null)[],
  basalArea: readonly number[],
  defaultWoodDensity: number = DEFAULT_WOOD_DENSITY,
): StemWoodDensities {
  if (hits.length !== basalArea.length) {
    throw new RangeError(`stemWoodDensities: arrays differ in length (${hits.length} vs ${basalArea.length})`);
  }
  if (!(defaultWoodDensity > 0) || !Number.isFinite(defaultWoodDensity)) {
    throw new RangeError(`stemWoodDensities: default wood density must be > 0 (got ${defaultWoodDensity})`);
  }
  let sumG = 0;
  let sumGR = 0;
  for (let i = 0; i < hits.length; i += 1) {
    const h = hits[i];
    const g = basalArea[i];
    if (!(g >= 0) || !Number.isFinite(g)) {
      throw new RangeError(`stemWoodDensities: basal area must be finite and >= 0 (got ${g} at index ${i})`);
    }
    if (h !== null) {
      sumG += g;
      sumGR += g * h.value;
    }
  }
  const fallback = sumG > 0 ? sumGR / sumG : defaultWoodDensity;
  const fallbackLevel: WoodDensityLevel = sumG > 0 ? 'plot' : 'default';
  const values = new Array<number>(hits.length);
  const levels = new Array<WoodDensityLevel>(hits.length);
  for (let i = 0; i < hits.length; i += 1) {
    const h = hits[i];
    values[i] = h === null ? fallback : h.value;
    levels[i] = h === null ? fallbackLevel : h.level;
  }
  return { values, levels };
}
