import { describe, expect, it } from 'vitest';
import { genusGender, inflectEpithet } from './latin-names';
import { FOREST_TYPES } from './scenario';
import { buildFlora, GUILDS, SPECIES_COLUMNS, speciesCsvLines } from './species';

// Well-known real genera of tropical trees (memory). The invented flora must use none of them.
const REAL_GENERA = `Acacia Albizia Alchornea Anacardium Aniba Annona Anogeissus Apeiba Bauhinia Beilschmiedia Bertholletia
Bombax Brachystegia Brosimum Bursera Calophyllum Canarium Carapa Caryocar Casearia Cecropia Cedrela Ceiba Chrysophyllum
Cinnamomum Coffea Combretum Copaifera Cordia Couepia Couratari Croton Cryptocarya Dacryodes Dalbergia Dialium Diospyros
Dipterocarpus Duguetia Elaeocarpus Entandrophragma Erisma Erythrina Eschweilera Eugenia Euphorbia Ficus Garcinia Guarea
Guatteria Handroanthus Heisteria Hevea Hirtella Hymenaea Inga Isoberlinia Julbernardia Khaya Lecythis Licania Litsea
Luehea Macaranga Mallotus Mangifera Manilkara Miconia Micropholis Milicia Minquartia Myrcia Nectandra Ocotea Parinari
Parkia Persea Piper Pouteria Protium Psychotria Pterocarpus Qualea Rinorea Sapium Senna Shorea Sloanea Spondias
Sterculia Swartzia Swietenia Symphonia Syzygium Tabebuia Tachigali Tectona Terminalia Tetragastris Theobroma Trema
Trichilia Virola Vitex Vochysia Xylopia Zelkova Quercus Pinus Eucalyptus`.split(/\s+/);

describe('buildFlora', () => {
  const flora = buildFlora();

  it('has 420 species in 120 genera and 40 families by default', () => {
    expect(flora.species).toHaveLength(420);
    expect(flora.genera).toHaveLength(120);
    expect(flora.families).toHaveLength(40);
    expect(new Set(flora.species.map((s) => s.genus)).size).toBe(120);
  });

  it('is the same flora every time and another flora for another seed', () => {
    expect(buildFlora()).toEqual(flora);
    expect(buildFlora({ seed: 99 }).species.map((s) => s.name)).not.toEqual(flora.species.map((s) => s.name));
  });

  it('writes every accepted name and synonym as a unique binomial "Genus epithet"', () => {
    const all = flora.species.flatMap((s) => [s.name, ...s.synonyms]);
    expect(new Set(all).size).toBe(all.length);
    for (const name of all) expect(name).toMatch(/^[A-Z][a-z]+ [a-z]+$/);
    flora.species.forEach((s, i) => {
      expect(s.index).toBe(i);
      expect(s.name.startsWith(`${s.genus} `)).toBe(true);
    });
  });

  it('uses none of a list of real tropical tree genera, in names or synonyms', () => {
    const genera = new Set(flora.species.flatMap((s) => [s.name, ...s.synonyms].map((n) => n.split(' ')[0])));
    for (const real of REAL_GENERA) expect(genera.has(real)).toBe(false);
  });

  it('names each family after one of its genera with -aceae (as botanical family names are formed)', () => {
    for (const family of flora.families) {
      expect(family).toMatch(/^[A-Z][a-z]+aceae$/);
      const stem = family.slice(0, -'aceae'.length);
      const members = flora.species.filter((s) => s.family === family).map((s) => s.genus);
      expect(members.some((g) => g.startsWith(stem.slice(0, -2)))).toBe(true);
    }
  });

  it('gives pioneers light wood and shade-tolerant species dense wood (demo ranges, common practice)', () => {
    for (const s of flora.species) {
      expect(GUILDS).toContain(s.guild);
      if (s.woodDensity === null) continue;
      expect(s.woodDensity).toBeGreaterThanOrEqual(0.1); // format spec range 0.1..1.5
      expect(s.woodDensity).toBeLessThanOrEqual(1.5);
      if (s.guild === 'pioneer') expect(s.woodDensity).toBeLessThanOrEqual(0.52);
      if (s.guild === 'shade_tolerant') expect(s.woodDensity).toBeGreaterThanOrEqual(0.58);
    }
    const share = (g: string) => flora.species.filter((s) => s.guild === g).length / flora.species.length;
    for (const g of GUILDS) expect(share(g)).toBeGreaterThan(0.08);
  });

  it('has synonyms for some species and some species the reference list lacks', () => {
    const withSynonyms = flora.species.filter((s) => s.synonyms.length > 0).length;
    const unlisted = flora.species.filter((s) => !s.listed).length;
    expect(withSynonyms).toBeGreaterThan(20);
    expect(flora.species.some((s) => s.synonyms.length === 2)).toBe(true);
    expect(unlisted).toBeGreaterThan(5);
    expect(unlisted).toBeLessThan(40);
  });

  it('gives every forest type a pool large enough for its richest plots (about 200 species)', () => {
    for (const t of FOREST_TYPES) {
      const pool = flora.species.filter((s) => s.weights[t] > 0).length;
      expect(pool).toBeGreaterThan(t === 'dry' ? 150 : 250);
    }
    expect(flora.species.every((s) => FOREST_TYPES.some((t) => s.weights[t] > 0))).toBe(true);
  });

  it('rejects impossible sizes with an error naming buildFlora', () => {
    expect(() => buildFlora({ genera: 10, families: 20 })).toThrow(/buildFlora/);
    expect(() => buildFlora({ species: 50 })).toThrow(/buildFlora/);
  });
});

describe('speciesCsvLines', () => {
  it('writes the spec header and one line per listed species, synonyms joined by ;', () => {
    const flora = buildFlora();
    const lines = speciesCsvLines(flora);
    expect(lines[0]).toBe(SPECIES_COLUMNS.join(','));
    expect(lines[0]).toBe('name,family,guild,wood_density,synonyms');
    expect(lines).toHaveLength(1 + flora.species.filter((s) => s.listed).length);
    const two = flora.species.find((s) => s.listed && s.synonyms.length === 2)!;
    const line = lines.find((l) => l.startsWith(`${two.name},`))!;
    expect(line.split(',')[4]).toBe(two.synonyms.join(';'));
    const unlisted = flora.species.find((s) => !s.listed)!;
    expect(lines.some((l) => l.startsWith(`${unlisted.name},`))).toBe(false);
  });
});

describe('epithet agreement (ICN Art. 23.5; Latin adjective endings, memory)', () => {
  it('takes the gender of the genus from its ending', () => {
    expect(genusGender('Dorvanthus')).toBe('masculine');
    expect(genusGender('Velkostoma')).toBe('neuter');
    expect(genusGender('Breskaria')).toBe('feminine');
    expect(genusGender('Olkistylis')).toBe('feminine');
  });

  it('inflects first/second and third declension adjectives and leaves genitives alone', () => {
    expect(inflectEpithet('alba', 'masculine')).toBe('albus');
    expect(inflectEpithet('alba', 'neuter')).toBe('album');
    expect(inflectEpithet('rubra', 'masculine')).toBe('ruber');
    expect(inflectEpithet('rubra', 'neuter')).toBe('rubrum');
    expect(inflectEpithet('silvestris', 'neuter')).toBe('silvestre');
    expect(inflectEpithet('silvestris', 'masculine')).toBe('silvestris');
    expect(inflectEpithet('elegans', 'neuter')).toBe('elegans');
    expect(inflectEpithet('hessarii', 'neuter')).toBe('hessarii');
    expect(inflectEpithet('minor', 'neuter')).toBe('minus');
  });
});
