// The invented flora of the demo country: families, genera and species with a regeneration guild,
// a wood density, synonyms, names the reference list lacks, and an abundance weight per forest type.
// Deterministic: the same options always give the same flora, whatever the inventory seed.

import { drawGenusName, EPITHETS, genusGender, inflectEpithet } from './latin-names';
import { rngFor, type Rng } from './random';
import { FOREST_TYPES, type ForestType } from './scenario';

export const GUILDS = ['pioneer', 'light_demander', 'shade_tolerant'] as const;
export type Guild = (typeof GUILDS)[number];

export interface Species {
  /** Position in `Flora.species` (sorted by name). */
  readonly index: number;
  /** Accepted name, `Genus epithet`. */
  readonly name: string;
  readonly genus: string;
  readonly family: string;
  readonly guild: Guild;
  /** Basic wood density, g/cm³; null where the reference list has none. */
  readonly woodDensity: number | null;
  /** Other names of the same species; crews sometimes still write them. */
  readonly synonyms: readonly string[];
  /** False for species crews name but the reference list lacks. */
  readonly listed: boolean;
  /** Relative abundance in each forest type (0 = absent). */
  readonly weights: Readonly<Record<ForestType, number>>;
}

export interface Flora {
  readonly species: readonly Species[];
  readonly families: readonly string[];
  readonly genera: readonly string[];
}

export interface FloraOptions {
  /** Seed of the flora (default 7301, fixed so every demo inventory shares one flora). */
  readonly seed?: number;
  /** Number of species (default 420). */
  readonly species?: number;
  /** Number of accepted genera (default 120). */
  readonly genera?: number;
  /** Number of families (default 40). */
  readonly families?: number;
}

export const FLORA_DEFAULTS = { seed: 7301, species: 420, genera: 120, families: 40 } as const;

const GENUS_GUILD_ODDS = [0.18, 0.34, 0.48]; // pioneer, light demander, shade tolerant
const SPECIES_KEEPS_GENUS_GUILD = 0.85;
const HOME_TYPE_ODDS = [0.45, 0.35, 0.2]; // wet, moist, dry: the dry forests are poorer
const UNLISTED_SHARE = 0.04;
const NO_DENSITY_SHARE = 0.04;
const MAX_SPECIES_PER_GENUS = 30;
const OLD_GENERA = 25;

// Wood density by guild (demo values in the usual tropical range: light pioneers ~0.3–0.5, dense shade-tolerant ~0.6–0.9 g/cm³; common practice).
const DENSITY_BY_GUILD: Readonly<Record<Guild, { mean: number; sd: number; min: number; max: number }>> = {
  pioneer: { mean: 0.4, sd: 0.05, min: 0.28, max: 0.52 },
  light_demander: { mean: 0.56, sd: 0.06, min: 0.42, max: 0.72 },
  shade_tolerant: { mean: 0.74, sd: 0.07, min: 0.58, max: 0.92 },
};

/** Builds the invented flora (420 species in 120 genera and 40 families by default). */
export function buildFlora(options: FloraOptions = {}): Flora {
  const seed = options.seed ?? FLORA_DEFAULTS.seed;
  const nSpecies = options.species ?? FLORA_DEFAULTS.species;
  const nGenera = options.genera ?? FLORA_DEFAULTS.genera;
  const nFamilies = options.families ?? FLORA_DEFAULTS.families;
  if (!(Number.isInteger(nFamilies) && nFamilies >= 1)) throw new RangeError(`buildFlora: families must be an integer >= 1, got ${nFamilies}`);
  if (!(Number.isInteger(nGenera) && nGenera >= nFamilies)) throw new RangeError(`buildFlora: genera must be an integer >= families, got ${nGenera}`);
  if (!(Number.isInteger(nSpecies) && nSpecies >= nGenera && nSpecies <= nGenera * MAX_SPECIES_PER_GENUS)) {
    throw new RangeError(`buildFlora: species must be an integer in [genera, ${MAX_SPECIES_PER_GENUS} × genera], got ${nSpecies}`);
  }
  const rng = rngFor(seed, 'flora');
  const usedGenera = new Set<string>();
  const genera = drawGenera(rng, usedGenera, nGenera, nFamilies);
  const perGenus = allocate(rng, nSpecies, genera.length, MAX_SPECIES_PER_GENUS);

  const drafts: (Omit<Species, 'index' | 'synonyms'> & { feminineEpithet: string })[] = [];
  genera.forEach((g, gi) => {
    const epithets = rng.shuffleInPlace([...EPITHETS]).slice(0, perGenus[gi]);
    const gender = genusGender(g.name);
    for (const feminine of epithets) {
      const epithet = inflectEpithet(feminine, gender);
      const guild = rng.chance(SPECIES_KEEPS_GENUS_GUILD) ? g.guild : GUILDS[rng.weightedIndex(GENUS_GUILD_ODDS)];
      drafts.push({
        name: `${g.name} ${epithet}`,
        feminineEpithet: feminine,
        genus: g.name,
        family: g.family,
        guild,
        woodDensity: rng.chance(NO_DENSITY_SHARE) ? null : drawDensity(rng, guild),
        listed: !rng.chance(UNLISTED_SHARE),
        weights: drawTypeWeights(rng),
      });
    }
  });
  drafts.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));

  const synonyms = drawSynonyms(rng, drafts, usedGenera);
  const species = drafts.map(({ feminineEpithet: _, ...d }, index) => ({ ...d, index, synonyms: synonyms[index] }));
  const families = [...new Set(genera.map((g) => g.family))].sort();
  return { species, families, genera: genera.map((g) => g.name).sort() };
}

interface DraftGenus {
  readonly name: string;
  readonly family: string;
  readonly guild: Guild;
}

function drawGenera(rng: Rng, used: Set<string>, nGenera: number, nFamilies: number): DraftGenus[] {
  const families: string[] = [];
  const genera: DraftGenus[] = [];
  const usedFamilies = new Set<string>();
  while (families.length < nFamilies) {
    const g = drawGenusName(rng, used);
    if (g.familyIfType === null || usedFamilies.has(g.familyIfType)) {
      used.delete(g.genus);
      continue;
    }
    usedFamilies.add(g.familyIfType);
    families.push(g.familyIfType);
    genera.push({ name: g.genus, family: g.familyIfType, guild: GUILDS[rng.weightedIndex(GENUS_GUILD_ODDS)] });
  }
  // Family sizes fall off with rank, so a few large families hold many genera.
  const familyWeights = families.map((_, i) => Math.pow(i + 1, -0.8));
  while (genera.length < nGenera) {
    const family = families[rng.weightedIndex(familyWeights)];
    const g = drawGenusName(rng, used);
    genera.push({ name: g.genus, family, guild: GUILDS[rng.weightedIndex(GENUS_GUILD_ODDS)] });
  }
  return genera;
}

/** Splits `total` items over `slots` (each at least 1, at most `cap`) with rank-decaying weights. */
function allocate(rng: Rng, total: number, slots: number, cap: number): number[] {
  const counts = new Array<number>(slots).fill(1);
  const weights = rng.shuffleInPlace(Array.from({ length: slots }, (_, i) => Math.pow(i + 1, -0.75)));
  for (let left = total - slots; left > 0; ) {
    const i = rng.weightedIndex(weights);
    if (counts[i] >= cap) {
      weights[i] = 0;
      continue;
    }
    counts[i] += 1;
    left -= 1;
  }
  return counts;
}

function drawDensity(rng: Rng, guild: Guild): number {
  const p = DENSITY_BY_GUILD[guild];
  const x = Math.min(p.max, Math.max(p.min, rng.normal(p.mean, p.sd)));
  return Math.round(x * 1000) / 1000;
}

// A species is at home in one forest type, often present in the neighbouring one (wet–moist, moist–dry)
// and rarely in the far one (wet–dry); its regional abundance is log-normal.
function drawTypeWeights(rng: Rng): Record<ForestType, number> {
  const abundance = Math.exp(rng.normal(0, 1.1));
  const home = rng.weightedIndex(HOME_TYPE_ODDS);
  const weights = { wet: 0, moist: 0, dry: 0 } as Record<ForestType, number>;
  FOREST_TYPES.forEach((type, i) => {
    const distance = Math.abs(i - home);
    const factor = distance === 0 ? 1 : distance === 1 ? (rng.chance(0.6) ? 0.35 : 0) : rng.chance(0.2) ? 0.08 : 0;
    weights[type] = abundance * factor;
  });
  return weights;
}

// Synonyms: an old genus with the same epithet (a transferred name) or a second epithet in the
// same genus (a lumped name); unique across every accepted name and synonym.
function drawSynonyms(rng: Rng, drafts: readonly { name: string; genus: string; listed: boolean; feminineEpithet: string }[], usedGenera: Set<string>): string[][] {
  const oldGenera = Array.from({ length: OLD_GENERA }, () => drawGenusName(rng, usedGenera).genus);
  const taken = new Set(drafts.map((d) => d.name));
  return drafts.map((d) => {
    if (!d.listed) return [];
    const count = rng.chance(0.03) ? 2 : rng.chance(0.13) ? 1 : 0;
    const names: string[] = [];
    for (let attempt = 0; names.length < count && attempt < 50; attempt++) {
      const epithet = d.feminineEpithet;
      const genus = rng.chance(0.6) ? rng.choice(oldGenera) : d.genus;
      const other = genus === d.genus ? rng.choice(EPITHETS) : epithet;
      const candidate = `${genus} ${inflectEpithet(other, genusGender(genus))}`;
      if (taken.has(candidate)) continue;
      taken.add(candidate);
      names.push(candidate);
    }
    return names;
  });
}

export const SPECIES_COLUMNS = ['name', 'family', 'guild', 'wood_density', 'synonyms'] as const;

/** One species.csv line (no line break) for a listed species. */
export function speciesCsvLine(s: Species): string {
  return [s.name, s.family, s.guild, s.woodDensity === null ? '' : String(s.woodDensity), s.synonyms.join(';')].join(',');
}

/** The reference list as crews' office would upload it: listed species only, header first. */
export function speciesCsvLines(flora: Flora): string[] {
  return [SPECIES_COLUMNS.join(','), ...flora.species.filter((s) => s.listed).map(speciesCsvLine)];
}
