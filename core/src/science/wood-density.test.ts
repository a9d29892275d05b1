import { describe, expect, it } from 'vitest';
import { SpeciesIndex, type SpeciesReference } from './species-names';
import { DEFAULT_WOOD_DENSITY, stemWoodDensities, WoodDensityTable } from './wood-density';

// Invented reference list; expected means computed by hand.
const ROWS: SpeciesReference[] = [
  { name: 'Veltria magna', family: 'Orvaceae', guild: 'pioneer', woodDensity: 0.4, synonyms: [] },
  { name: 'Veltria minor', family: 'Orvaceae', guild: 'shade_tolerant', woodDensity: 0.7, synonyms: [] },
  { name: 'Veltria nuda', family: 'Orvaceae', guild: 'shade_tolerant', woodDensity: null, synonyms: [] },
  { name: 'Ostra lenta', family: 'Orvaceae', guild: 'light_demander', woodDensity: 0.9, synonyms: [] },
  { name: 'Quenna alta', family: 'Dravaceae', guild: 'light_demander', woodDensity: null, synonyms: [] },
  { name: 'Pellamo rubra', family: 'Dravaceae', guild: 'shade_tolerant', woodDensity: 0.8, synonyms: [] },
];
const index = new SpeciesIndex(ROWS);
const table = new WoodDensityTable(index);
const close = (got: number | undefined, want: number): void => expect(Math.abs((got as number) - want)).toBeLessThan(1e-15);

describe('WoodDensityTable.lookup', () => {
  it('uses the species value when it has one', () => {
    expect(table.lookup(index.resolve('Veltria magna'))).toEqual({ value: 0.4, level: 'species' });
  });
  it('uses the genus mean for a species without a value: (0.4 + 0.7)/2 = 0.55', () => {
    const hit = table.lookup(index.resolve('Veltria nuda'));
    expect(hit?.level).toBe('genus');
    close(hit?.value, 0.55);
  });
  it('uses the genus mean for Genus sp. and genus-level names', () => {
    expect(table.lookup(index.resolve('Veltria sp.'))?.level).toBe('genus');
    expect(table.lookup(index.resolve('Veltria nova'))?.level).toBe('genus');
  });
  it('uses the family mean when the genus has no value: Quenna alta → Dravaceae mean 0.8', () => {
    expect(table.lookup(index.resolve('Quenna alta'))).toEqual({ value: 0.8, level: 'family' });
  });
  it('uses the family mean when only the family is known: Orvaceae indet → (0.4 + 0.7 + 0.9)/3', () => {
    const hit = table.lookup(index.resolve('Orvaceae indet'));
    expect(hit?.level).toBe('family');
    close(hit?.value, 2 / 3);
  });
  it('gives null when neither species, genus nor family has a value', () => {
    expect(table.lookup(index.resolve('Xenoa spinosa'))).toBeNull();
    expect(table.lookup(index.resolve('unknown'))).toBeNull();
  });
});

describe('stemWoodDensities', () => {
  const sp = table.lookup(index.resolve('Veltria magna')); // 0.4
  const ge = table.lookup(index.resolve('Veltria sp.')); // 0.55
  it('fills stems without a reference value with the basal-area-weighted plot mean', () => {
    // plot mean = (0.1·0.4 + 0.3·0.55)/(0.1 + 0.3) = 0.5125
    const r = stemWoodDensities([sp, ge, null], [0.1, 0.3, 0.2]);
    expect(r.levels).toEqual(['species', 'genus', 'plot']);
    close(r.values[2], 0.5125);
  });
  it('falls back to the default when no stem has a value (DEFAULT_WOOD_DENSITY = 0.58, memory)', () => {
    expect(DEFAULT_WOOD_DENSITY).toBe(0.58);
    expect(stemWoodDensities([null, null], [0.1, 0.2])).toEqual({ values: [0.58, 0.58], levels: ['default', 'default'] });
    expect(stemWoodDensities([null], [0.1], 0.62).values).toEqual([0.62]);
  });
  it('rejects mismatched arrays and a non-positive default', () => {
    expect(() => stemWoodDensities([null], [])).toThrow(/stemWoodDensities/);
    expect(() => stemWoodDensities([], [], 0)).toThrow(/stemWoodDensities/);
  });
});
