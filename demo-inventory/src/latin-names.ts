// Latin-looking names for the invented flora. Genus names join an invented stem (built around
// consonant clusters that Latin botanical names avoid: -rv, -sk, -lk, -lq) to a Greek-Latin ending;
// a family takes the stem of its type genus plus -aceae, as botanical families do (ICN Art. 18.1).
// They are made up: none is meant to be, or to look like, a real taxon.

import type { Rng } from './random';

const STEMS = [
  'Arvel', 'Bresk', 'Calvor', 'Dorv', 'Elsk', 'Fenvor', 'Galk', 'Harvel', 'Isvor', 'Jelk',
  'Karv', 'Lesk', 'Morvel', 'Nesk', 'Olk', 'Pervol', 'Quarv', 'Resk', 'Tarv', 'Uvesk',
  'Velk', 'Wesk', 'Yarv', 'Brovel', 'Cresk', 'Drelk', 'Frov', 'Glesk', 'Hurv', 'Kresk',
  'Lorv', 'Melv', 'Norv', 'Plesk', 'Prelv', 'Scarv', 'Tresk', 'Vorl', 'Telq', 'Sulq',
] as const;

/** Ending of a genus name and the stem its family name would take (anthus → anth-aceae). */
interface Ending {
  readonly genus: string;
  readonly familyStem: string | null;
}

const ENDINGS: readonly Ending[] = [
  { genus: 'anthus', familyStem: 'anth' },
  { genus: 'carpa', familyStem: 'carp' },
  { genus: 'ria', familyStem: 'ri' },
  { genus: 'phylla', familyStem: 'phyll' },
  { genus: 'dendra', familyStem: 'dendr' },
  { genus: 'lia', familyStem: 'li' },
  { genus: 'nia', familyStem: 'ni' },
  { genus: 'stoma', familyStem: 'stomat' },
  { genus: 'gyne', familyStem: 'gyn' },
  { genus: 'mera', familyStem: 'mer' },
  { genus: 'tella', familyStem: 'tell' },
  { genus: 'ndra', familyStem: 'ndr' },
  { genus: 'opsis', familyStem: null },
  { genus: 'sperma', familyStem: 'spermat' },
  { genus: 'cladus', familyStem: 'clad' },
  { genus: 'thamnus', familyStem: 'thamn' },
  { genus: 'coccus', familyStem: 'cocc' },
  { genus: 'nema', familyStem: 'nemat' },
  { genus: 'stylis', familyStem: 'stylid' },
  { genus: 'odia', familyStem: 'odi' },
];

const LINKS = ['a', 'e', 'i', 'o'] as const;

/** Descriptive Latin epithets in the feminine (ordinary adjectives; only the binomials built with them are invented). */
export const EPITHETS: readonly string[] = [
  'alba', 'rubra', 'nigra', 'grandifolia', 'parvifolia', 'longifolia', 'latifolia', 'montana',
  'riparia', 'silvestris', 'occidentalis', 'orientalis', 'australis', 'borealis', 'tenuis', 'robusta',
  'elegans', 'glabra', 'pubescens', 'tomentosa', 'velutina', 'coriacea', 'acuminata', 'obovata',
  'elliptica', 'lanceolata', 'cordata', 'spinosa', 'macrocarpa', 'microcarpa', 'macrophylla',
  'microphylla', 'pallida', 'lutea', 'aurea', 'ferruginea', 'cinerea', 'fragrans', 'odorata',
  'altissima', 'excelsa', 'gigantea', 'minor', 'major', 'nitida', 'lucida', 'rigida', 'gracilis',
  'undulata', 'crassa', 'laxiflora', 'densiflora', 'multiflora', 'pauciflora', 'racemosa',
  'paniculata', 'umbellata', 'verticillata', 'opposita', 'sessilis', 'petiolata', 'caudata',
  'costata', 'rugosa', 'scabra', 'saxatilis', 'palustris', 'fluvialis', 'littoralis', 'collina',
  'umbrosa', 'sylvatica', 'insularis', 'obtusa', 'emarginata', 'reticulata', 'venosa', 'glauca',
  'argentea', 'sericea', 'hirsuta', 'villosa', 'lepidota', 'punctata', 'maculata', 'striata',
  'angustifolia', 'rotundifolia', 'cuneata', 'oblonga', 'ovalis', 'falcata', 'torta', 'dura',
  'mollis', 'amara', 'dulcis', 'aromatica', 'resinosa', 'lactescens', 'cauliflora', 'ramiflora',
  // Invented places and invented collectors of the demo country.
  'tavolirensis', 'alvenorensis', 'brisquetiana', 'calderethensis', 'duvantae', 'eskarelensis',
  'morvanica', 'hessarii', 'quillonii', 'marvettae', 'doranthii', 'velmorei',
];

export type Gender = 'masculine' | 'feminine' | 'neuter';

// Grammatical gender follows the ending, as in Greek-Latin botanical names: -us masculine, -ma neuter, -a/-is/-e feminine.
export function genusGender(genus: string): Gender {
  if (/us$/.test(genus)) return 'masculine';
  if (/ma$/.test(genus)) return 'neuter';
  return 'feminine';
}

// Adjectives whose masculine drops the -us (ruber, niger…): feminine form → [masculine, neuter].
const IRREGULAR: Readonly<Record<string, readonly [string, string]>> = {
  rubra: ['ruber', 'rubrum'],
  nigra: ['niger', 'nigrum'],
  glabra: ['glaber', 'glabrum'],
  scabra: ['scaber', 'scabrum'],
  minor: ['minor', 'minus'],
  major: ['major', 'majus'],
};

// An epithet agrees in gender with its genus (ICN Art. 23.5): alba/albus/album, silvestris/silvestre; genitives (-ii, -ae) and participles (-ans, -ens) do not change.
export function inflectEpithet(feminine: string, gender: Gender): string {
  if (gender === 'feminine' || /(ii|ae|ns)$/.test(feminine)) return feminine;
  const irregular = IRREGULAR[feminine];
  if (irregular !== undefined) return gender === 'masculine' ? irregular[0] : irregular[1];
  if (/a$/.test(feminine)) return feminine.slice(0, -1) + (gender === 'masculine' ? 'us' : 'um');
  if (/is$/.test(feminine)) return gender === 'masculine' ? feminine : feminine.slice(0, -2) + 'e';
  return feminine;
}

/** An invented genus name and the family name it would give as a type genus (null if it cannot). */
export interface GenusName {
  readonly genus: string;
  readonly familyIfType: string | null;
}

/** Draws a genus name not yet in `used` (which it then adds), e.g. `Dorvocarpa` → `Dorvocarpaceae`. */
export function drawGenusName(rng: Rng, used: Set<string>): GenusName {
  for (let attempt = 0; attempt < 10_000; attempt++) {
    const stem = rng.choice(STEMS);
    const ending = rng.choice(ENDINGS);
    const startsWithVowel = /^[aeiou]/.test(ending.genus);
    const link = startsWithVowel ? '' : rng.choice(LINKS);
    const genus = stem + link + ending.genus;
    if (used.has(genus)) continue;
    used.add(genus);
    const familyIfType = ending.familyStem === null ? null : `${stem}${link}${ending.familyStem}aceae`;
    return { genus, familyIfType };
  }
  throw new Error('drawGenusName: ran out of unused genus names');
}
