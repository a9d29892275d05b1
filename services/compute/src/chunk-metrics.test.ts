import { describe, expect, it } from 'vitest';
import { SpeciesIndex, type SpeciesReference } from '@stemwise/core/science';
import { speciesStems } from './chunk-metrics';

// An invented reference list (demo scenario of our own; no real taxa).
const ROWS: SpeciesReference[] = [
  { name: 'Veltria magna', family: 'Orvaceae', guild: 'pioneer', woodDensity: 0.35, synonyms: ['Veltria grandis'] },
  { name: 'Quenna alta', family: 'Dravaceae', guild: 'light_demander', woodDensity: null, synonyms: [] },
];
const live = (species: string | null, inSubplot = false) => ({ species, status: 'live' as const, inSubplot });

describe('speciesStems (the accepted species stored with a visit for the region species counts)', () => {
  const index = new SpeciesIndex(ROWS);

  it('counts live main-plot stems by accepted name: synonyms and spelling variants join their species', () => {
    expect(speciesStems([live('Veltria magna'), live('Veltria grandis'), live('  VELTRIA magna '), live('Quenna alta')], index)).toEqual({ 'Veltria magna': 3, 'Quenna alta': 1 });
  });

  it('leaves out dead stems, stumps, subplot stems, genus-only, unresolved and missing names', () => {
    const stems = [
      { species: 'Quenna alta', status: 'dead' as const, inSubplot: false },
      { species: 'Quenna alta', status: 'stump' as const, inSubplot: false },
      live('Quenna alta', true),
      live('Veltria sp.'),
      live('Ostra nova'),
      live('indet'),
      live(null),
    ];
    expect(speciesStems(stems, index)).toEqual({});
  });
});
