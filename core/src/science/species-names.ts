// Scientific names as recorded in the field, and their resolution against the species reference list.
// Pure string handling: no I/O; a SpeciesIndex is built once from reference rows and then reused.

export type Guild = 'pioneer' | 'light_demander' | 'shade_tolerant';
export const GUILDS: readonly Guild[] = ['pioneer', 'light_demander', 'shade_tolerant'];

/** One row of the species reference list (species.csv). */
export interface SpeciesReference {
  readonly name: string;
  readonly family: string;
  readonly guild: Guild;
  /** Basic wood density, g/cm³, or null when unknown. */
  readonly woodDensity: number | null;
  readonly synonyms: readonly string[];
}

/** How a recorded name was matched, most to least certain (the order resolve() tries them). */
export type ResolutionLevel = 'exact' | 'synonym' | 'normalised' | 'genus' | 'unidentified' | 'unresolved';

export interface SpeciesResolution {
  readonly level: ResolutionLevel;
  /** The accepted species; set only for exact, synonym and normalised matches. */
  readonly species: SpeciesReference | null;
  /** A genus of the reference list, when one is known for the name. */
  readonly genus: string | null;
  readonly family: string | null;
}

const UNIDENTIFIED_WORDS = new Set(['indet', 'indeterminate', 'unknown', 'unidentified']);
const NOT_TO_SPECIES = new Set(['sp', 'spp', 'indet', 'indeterminate', 'unknown']);
const QUALIFIERS = ['cf.', 'cf', 'aff.', 'aff'];

function bare(token: string): string {
  return token.toLowerCase().replace(/\.+$/, '');
}

function titleCase(token: string): string {
  return token.charAt(0).toUpperCase() + token.slice(1).toLowerCase();
}

function tokens(name: string): string[] {
  const out: string[] = [];
  for (const raw of name.trim().split(/\s+/)) {
    if (raw === '') continue;
    const lower = raw.toLowerCase();
    if (QUALIFIERS.includes(lower)) continue;
    // "cf.edulis" written without a space
    const glued = lower.startsWith('cf.') ? 3 : lower.startsWith('aff.') ? 4 : 0;
    out.push(glued > 0 ? raw.slice(glued) : raw);
  }
  return out;
}

// A second word is an epithet when it is letters and hyphens only; in a conventionally written name
// (Genus capitalised) an epithet is lower-case, so a capitalised word there is an author ("Inga Mill.").
function isEpithet(word: string, conventional: boolean): boolean {
  if (!/^[\p{L}-]+$/u.test(word)) return false;
  return !conventional || word.charAt(0) === word.charAt(0).toLowerCase();
}

/**
 * `Genus epithet` from a recorded name: spacing collapsed, case normalised, the qualifiers cf./aff.
 * dropped, and everything after the epithet dropped (authorities such as `L.` or `(Smith) Jones`,
 * infraspecific ranks `var.`, `subsp.`, `ssp.`, `f.` and what follows). A name not identified to
 * species gives `Genus sp.` (`sp`, `spp.`, `indet` after a genus) or the bare first word.
 * Note: `aff.` (near, but not, that species) is treated like `cf.` by this choice of the tool.
 */
export function normaliseName(name: string): string {
  const t = tokens(name);
  if (t.length === 0) return '';
  const genus = titleCase(t[0]);
  if (t.length === 1) return genus;
  const second = t[1];
  if (NOT_TO_SPECIES.has(bare(second))) return `${genus} sp.`;
  const conventional = /^\p{Lu}[\p{Ll}-]*$/u.test(t[0]);
  return isEpithet(second, conventional) ? `${genus} ${second.toLowerCase()}` : genus;
}

/**
 * True when a recorded name does not identify a species: empty, `indet`, `unknown` (any case, also
 * `indeterminate`, `unidentified`), `Genus sp.`/`sp`/`spp.` (with or without a morphospecies label
 * such as `sp. 3`), or a single word (a genus or family alone).
 */
export function isUnidentified(name: string | null | undefined): boolean {
  if (name === null || name === undefined) return true;
  const t = tokens(name);
  if (t.length === 0) return true;
  if (UNIDENTIFIED_WORDS.has(bare(t[0]))) return true;
  const normalised = normaliseName(name);
  return !normalised.includes(' ') || normalised.endsWith(' sp.');
}

function genusOf(normalised: string): string {
  const space = normalised.indexOf(' ');
  return space < 0 ? normalised : normalised.slice(0, space);
}

const GUILD_SET = new Set<string>(GUILDS);
const CACHE_LIMIT = 100_000;

/**
 * Lookup of recorded names in a reference list. Throws on a list that cannot be resolved
 * unambiguously: duplicate accepted names, or a synonym claimed by two species or equal to another
 * species' accepted name. Names that only collide after normalisation (homonyms with different
 * authors) are left out of the normalised level and listed in `ambiguousNormalisedNames`.
 */
export class SpeciesIndex {
  readonly species: readonly SpeciesReference[];
  readonly ambiguousNormalisedNames: readonly string[];
  private readonly byName = new Map<string, SpeciesReference>();
  private readonly bySynonym = new Map<string, SpeciesReference>();
  private readonly byNormalised = new Map<string, SpeciesReference | null>();
  private readonly familyOfGenus = new Map<string, string>();
  private readonly familyByLowerName = new Map<string, string>();
  private readonly cache = new Map<string, SpeciesResolution>();

  constructor(rows: readonly SpeciesReference[]) {
    this.species = rows;
    const familyVotes = new Map<string, Map<string, number>>();
    for (const row of rows) {
      const name = row.name?.trim();
      if (!name) throw new RangeError('SpeciesIndex: a reference row has an empty name');
      if (!row.family?.trim()) throw new RangeError(`SpeciesIndex: ${name} has no family`);
      if (!GUILD_SET.has(row.guild)) throw new RangeError(`SpeciesIndex: ${name} has an unknown guild ${String(row.guild)}`);
      if (row.woodDensity !== null && !(row.woodDensity > 0 && Number.isFinite(row.woodDensity))) {
        throw new RangeError(`SpeciesIndex: ${name} has an invalid wood density ${row.woodDensity}`);
      }
      if (this.byName.has(name)) throw new RangeError(`SpeciesIndex: ${name} is listed twice`);
      this.byName.set(name, row);
      const genus = genusOf(normaliseName(name));
      const votes = familyVotes.get(genus) ?? new Map<string, number>();
      votes.set(row.family, (votes.get(row.family) ?? 0) + 1);
      familyVotes.set(genus, votes);
      this.familyByLowerName.set(row.family.toLowerCase(), row.family);
    }
    for (const row of rows) {
      for (const raw of row.synonyms) {
        const syn = raw.trim();
        if (syn === '' || syn === row.name.trim()) continue;
        const accepted = this.byName.get(syn);
        if (accepted !== undefined) {
          throw new RangeError(`SpeciesIndex: synonym ${syn} of ${row.name} is itself an accepted name`);
        }
        const other = this.bySynonym.get(syn);
        if (other !== undefined && other !== row) {
          throw new RangeError(`SpeciesIndex: synonym ${syn} is claimed by ${other.name} and ${row.name}`);
        }
        this.bySynonym.set(syn, row);
      }
    }
    // Normalised accepted names first, then normalised synonyms where they do not collide.
    const ambiguous = new Set<string>();
    const addNormalised = (key: string, row: SpeciesReference): void => {
      if (key === '' || !key.includes(' ') || key.endsWith(' sp.')) return;
      const have = this.byNormalised.get(key);
      if (have === undefined) this.byNormalised.set(key, row);
      else if (have !== row) {
        this.byNormalised.set(key, null); // null marks a key that names two species
        ambiguous.add(key);
      }
    };
    for (const row of rows) addNormalised(normaliseName(row.name), row);
    const acceptedKeys = new Set(this.byNormalised.keys());
    for (const row of rows) {
      for (const syn of row.synonyms) {
        const key = normaliseName(syn);
        if (acceptedKeys.has(key)) continue; // an accepted name wins over a synonym
        addNormalised(key, row);
      }
    }
    this.ambiguousNormalisedNames = [...ambiguous].sort();
    for (const [genus, votes] of familyVotes) {
      let best = '';
      let bestCount = 0;
      for (const [family, count] of votes) {
        if (count > bestCount) {
          best = family;
          bestCount = count;
        }
      }
      this.familyOfGenus.set(genus, best);
    }
  }

  /** Family of a genus of the list (the family most of its species have), or null. */
  familyOfGenusName(genus: string): string | null {
    return this.familyOfGenus.get(genus) ?? null;
  }

  /** Genus of an accepted reference name, as used for genus-level lookups. */
  static genusOfName(name: string): string {
    return genusOf(normaliseName(name));
  }

  /**
   * Resolves a recorded name: exact accepted name, then exact synonym, then (unless the name is not
   * identified to species) the normalised name among normalised accepted names and synonyms, then a
   * known genus (family known, species null). Unidentified names still carry a known genus or family
   * (`Inga sp.`, `Fabaceae indet`). Results are cached per recorded string and shared: do not mutate.
   */
  resolve(rawName: string | null): SpeciesResolution {
    if (rawName === null) return UNIDENTIFIED_NOTHING;
    const cached = this.cache.get(rawName);
    if (cached !== undefined) return cached;
    const result = this.resolveUncached(rawName);
    if (this.cache.size >= CACHE_LIMIT) this.cache.clear();
    this.cache.set(rawName, result);
    return result;
  }

  private resolveUncached(rawName: string): SpeciesResolution {
    const name = rawName.trim();
    const exact = this.byName.get(name);
    if (exact !== undefined) return this.hit('exact', exact);
    const synonym = this.bySynonym.get(name);
    if (synonym !== undefined) return this.hit('synonym', synonym);
    const normalised = normaliseName(name);
    const first = genusOf(normalised);
    if (isUnidentified(name)) {
      const family = this.familyOfGenus.get(first);
      if (family !== undefined) return Object.freeze({ level: 'unidentified', species: null, genus: first, family });
      const familyOnly = this.familyByLowerName.get(first.toLowerCase());
      if (familyOnly !== undefined) return Object.freeze({ level: 'unidentified', species: null, genus: null, family: familyOnly });
      return UNIDENTIFIED_NOTHING;
    }
    const byNormalised = this.byNormalised.get(normalised);
    if (byNormalised) return this.hit('normalised', byNormalised);
    const family = this.familyOfGenus.get(first);
    if (family !== undefined) return Object.freeze({ level: 'genus', species: null, genus: first, family });
    return UNRESOLVED;
  }

  private hit(level: 'exact' | 'synonym' | 'normalised', row: SpeciesReference): SpeciesResolution {
    return Object.freeze({ level, species: row, genus: genusOf(normaliseName(row.name)), family: row.family });
  }
}

const UNIDENTIFIED_NOTHING: SpeciesResolution = Object.freeze({
  level: 'unidentified',
  species: null,
  genus: null,
  family: null,
});
const UNRESOLVED: SpeciesResolution = Object.freeze({ level: 'unresolved', species: null, genus: null, family: null });

/** True when a resolution names an accepted species (exact, synonym or normalised match). */
export function isResolvedToSpecies(r: SpeciesResolution): boolean {
  return r.species !== null;
}
