import { describe, expect, it } from 'vitest';
import type { PlotStemRow, PlotVisitRow } from '@stemwise/db';
import { SpeciesIndex } from '@stemwise/core';
import { countedLiveStems, speciesLines } from './plot-page-data';

// An invented visit: a 0.5 ha plot (dbh ≥ 10 cm) with a 0.05 ha subplot (dbh ≥ 5 cm).
const visit = { areaHa: 0.5, dbhMinCm: 10, subplotAreaHa: 0.05, subplotDbhMinCm: 5 } as PlotVisitRow;
const stem = (treeId: string, species: string | null, dbhCm: number, inSubplot = false, status = 'live'): PlotStemRow => ({ treeId, species, dbhCm, heightM: null, status, inSubplot });
const index = new SpeciesIndex([
  { name: 'Arborea lucida', family: 'Lucidaceae', guild: 'shade_tolerant', woodDensity: 0.6, synonyms: ['Arborea splendens'] },
  { name: 'Velox primus', family: 'Veloxaceae', guild: 'pioneer', woodDensity: null, synonyms: [] },
]);

describe('plot page data', () => {
  it('counts live stems at or above the minimum of their own area, each with its expansion factor', () => {
    const stems = countedLiveStems(visit, [stem('a', 'Velox primus', 12), stem('b', 'Velox primus', 8), stem('c', 'Velox primus', 6, true), stem('d', 'Velox primus', 4, true), stem('e', 'Velox primus', 30, false, 'dead')]);
    expect(stems.map((s) => [s.treeId, s.weight])).toEqual([['a', 2], ['c', 20]]);
  });

  it('groups stems by accepted species, synonyms included, largest basal area first', () => {
    const stems = countedLiveStems(visit, [stem('a', 'Arborea splendens', 40), stem('b', 'Arborea lucida', 20), stem('c', 'Velox primus', 30), stem('d', 'Mysteria nova', 11)]);
    const lines = speciesLines(stems, index);
    expect(lines.map((l) => [l.accepted, l.stems, l.recorded])).toEqual([
      ['Arborea lucida', 2, ['Arborea splendens']],
      ['Velox primus', 1, []],
      [null, 1, ['Mysteria nova']],
    ]);
    // basal area per ha: 2 × π (0.2² + 0.1²) = 0.3142 m²/ha (computed by hand)
    expect(lines[0].basalAreaM2Ha).toBeCloseTo(0.314159, 5);
  });
});
