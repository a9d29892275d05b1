import { describe, expect, it } from 'vitest';
import { isUnidentified, normaliseName, SpeciesIndex, type SpeciesReference } from './species-names';

// An invented reference list (demo scenario of our own; no real taxa).
const ROWS: SpeciesReference[] = [
  { name: 'Veltria magna', family: 'Orvaceae', guild: 'pioneer', woodDensity: 0.35, synonyms: ['Veltria grandis', 'Ostra magna Hollis'] },
  { name: 'Veltria minor', family: 'Orvaceae', guild: 'shade_tolerant', woodDensity: 0.71, synonyms: [] },
  { name: 'Quenna alta', family: 'Dravaceae', guild: 'light_demander', woodDensity: null, synonyms: ['Quenna elata'] },
  { name: 'Pellamo rubra', family: 'Dravaceae', guild: 'shade_tolerant', woodDensity: 0.82, synonyms: [] },
];

describe('normaliseName (rules of the name-handling spec; examples constructed by hand)', () => {
  it.each([
    ['  veltria   MAGNA ', 'Veltria magna'],
    ['VELTRIA MAGNA', 'Veltria magna'],
    ['Veltria\tmagna', 'Veltria magna'],
    ['Veltria cf. magna', 'Veltria magna'],
    ['Veltria aff. magna', 'Veltria magna'],
    ['Veltria cf.magna', 'Veltria magna'],
    ['Veltria magna L.', 'Veltria magna'],
    ['Veltria magna (Smith) Jones', 'Veltria magna'],
    ['Veltria magna var. parva Hollis', 'Veltria magna'],
    ['Veltria magna subsp. parva', 'Veltria magna'],
    ['Veltria magna ssp. parva', 'Veltria magna'],
    ['Veltria magna f. alba', 'Veltria magna'],
    ['Veltria sp.', 'Veltria sp.'],
    ['veltria SPP', 'Veltria sp.'],
    ['Veltria Mill.', 'Veltria'],
    ['Veltria', 'Veltria'],
    ['', ''],
  ])('%j → %j', (raw, want) => {
    expect(normaliseName(raw)).toBe(want);
  });
});

describe('isUnidentified', () => {
  it.each(['', '   ', 'indet', 'INDET.', 'Unknown', 'unknown 3', 'Veltria sp.', 'Veltria sp', 'Veltria spp.',
    'Veltria sp. 3', 'Veltria sp.3', 'Veltria', 'Orvaceae indet', 'Veltria Mill.'])('%j is not identified to species', (name) => {
    expect(isUnidentified(name)).toBe(true);
  });
  it('null and undefined are unidentified', () => {
    expect(isUnidentified(null)).toBe(true);
    expect(isUnidentified(undefined)).toBe(true);
  });
  it.each(['Veltria magna', 'veltria cf. magna', 'Xenoa spinosa', 'Veltria spinosa'])('%j is identified', (name) => {
    expect(isUnidentified(name)).toBe(false);
  });
});

describe('SpeciesIndex.resolve', () => {
  const index = new SpeciesIndex(ROWS);

  it('matches an accepted name exactly', () => {
    const r = index.resolve('Veltria magna');
    expect(r.level).toBe('exact');
    expect(r.species?.name).toBe('Veltria magna');
    expect(r.genus).toBe('Veltria');
    expect(r.family).toBe('Orvaceae');
  });
  it('matches a synonym to its accepted species', () => {
    const r = index.resolve('Quenna elata');
    expect(r.level).toBe('synonym');
    expect(r.species?.name).toBe('Quenna alta');
    expect(index.resolve('Ostra magna Hollis').species?.name).toBe('Veltria magna');
  });
  it('matches normalised names and normalised synonyms', () => {
    expect(index.resolve('VELTRIA  minor Hollis').level).toBe('normalised');
    expect(index.resolve('VELTRIA  minor Hollis').species?.name).toBe('Veltria minor');
    const syn = index.resolve('veltria cf. grandis');
    expect(syn.level).toBe('normalised');
    expect(syn.species?.name).toBe('Veltria magna');
    expect(index.resolve('Ostra magna').species?.name).toBe('Veltria magna');
  });
  it('falls back to a known genus: family known, species null', () => {
    const r = index.resolve('Pellamo nova');
    expect(r).toEqual({ level: 'genus', species: null, genus: 'Pellamo', family: 'Dravaceae' });
  });
  it('keeps the genus and family of unidentified names when the list knows them', () => {
    expect(index.resolve('Quenna sp.')).toEqual({ level: 'unidentified', species: null, genus: 'Quenna', family: 'Dravaceae' });
    expect(index.resolve('orvaceae indet')).toEqual({ level: 'unidentified', species: null, genus: null, family: 'Orvaceae' });
    expect(index.resolve('unknown')).toEqual({ level: 'unidentified', species: null, genus: null, family: null });
    expect(index.resolve(null).level).toBe('unidentified');
    expect(index.resolve('').level).toBe('unidentified');
  });
  it('reports names of unknown genera as unresolved', () => {
    expect(index.resolve('Xenoa spinosa')).toEqual({ level: 'unresolved', species: null, genus: null, family: null });
  });
  it('returns the same shared result for the same recorded string (cache)', () => {
    expect(index.resolve('Veltria grandis')).toBe(index.resolve('Veltria grandis'));
  });
});

describe('SpeciesIndex construction', () => {
  const row = (name: string, synonyms: string[] = [], family = 'Orvaceae'): SpeciesReference => ({
    name, family, guild: 'pioneer', woodDensity: 0.5, synonyms,
  });
  it('rejects duplicate accepted names', () => {
    expect(() => new SpeciesIndex([row('Veltria magna'), row('Veltria magna')])).toThrow(/SpeciesIndex: Veltria magna is listed twice/);
  });
  it('rejects a synonym claimed by two species or equal to an accepted name', () => {
    expect(() => new SpeciesIndex([row('Veltria magna', ['Ostra x']), row('Veltria minor', ['Ostra x'])])).toThrow(/claimed by/);
    expect(() => new SpeciesIndex([row('Veltria magna', ['Veltria minor']), row('Veltria minor')])).toThrow(/accepted name/);
  });
  it('rejects an unknown guild and an invalid wood density', () => {
    expect(() => new SpeciesIndex([{ ...row('Veltria magna'), guild: 'climax' as never }])).toThrow(/unknown guild/);
    expect(() => new SpeciesIndex([{ ...row('Veltria magna'), woodDensity: -1 }])).toThrow(/invalid wood density/);
  });
  it('leaves homonyms that differ only by author out of the normalised level, and lists them', () => {
    const index = new SpeciesIndex([row('Veltria alba Hollis'), row('Veltria alba Smith')]);
    expect(index.ambiguousNormalisedNames).toEqual(['Veltria alba']);
    expect(index.resolve('Veltria alba').level).toBe('genus');
    expect(index.resolve('Veltria alba Smith').level).toBe('exact');
  });
  it('gives a genus the family most of its species have', () => {
    const index = new SpeciesIndex([row('Veltria a', [], 'Orvaceae'), row('Veltria b', [], 'Orvaceae'), row('Veltria c', [], 'Dravaceae')]);
    expect(index.familyOfGenusName('Veltria')).toBe('Orvaceae');
    expect(index.familyOfGenusName('Nothing')).toBeNull();
  });
});
