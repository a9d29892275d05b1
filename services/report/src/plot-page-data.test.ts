import { describe, expect, it } from 'vitest';
import type { PlotStemRow, PlotVisitRow } from '@stemwise/db';
import { SpeciesIndex } from '@stemwise/core';
import { countedLiveStems, plotDiameterClasses, speciesLines } from './plot-page-data';

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

  it('puts the subplot stems below the reporting threshold in a class of their own in front of the stand-table classes', () => {
    const stems = countedLiveStems(visit, [stem('a', null, 7, true), stem('b', null, 12), stem('c', null, 15), stem('d', null, 34), stem('e', null, 105)]);
    const classes = plotDiameterClasses(visit, stems, 10);
    expect(classes.map((c) => [c.lowerCm, c.upperCm, c.stems])).toEqual([
      [5, 10, 1], [10, 20, 2], [20, 30, 0], [30, 40, 1], [40, 50, 0], [50, 60, 0], [60, 70, 0], [70, 80, 0], [80, 90, 0], [90, 100, 0], [100, null, 1],
    ]);
    // computed by hand: w = 20 on the subplot, 2 on the plot; g = π (D/200)²
    expect(classes[0].stemsHa).toBe(20);
    expect(classes[0].basalAreaM2Ha).toBeCloseTo(0.076969, 5);
    expect(classes[1].basalAreaM2Ha).toBeCloseTo(0.0579624, 6);
    expect(classes[3].basalAreaM2Ha).toBeCloseTo(0.181584, 5);
    expect(classes[10].basalAreaM2Ha).toBeCloseTo(1.731803, 5);
    // a visit measured from 20 cm only: the classes it did not measure are left out
    const from20 = { ...visit, dbhMinCm: 20, subplotAreaHa: 0 } as PlotVisitRow;
    expect(plotDiameterClasses(from20, countedLiveStems(from20, [stem('x', null, 25)]), 10)[0]).toMatchObject({ lowerCm: 20, upperCm: 30, stems: 1, stemsHa: 2 });
  });
});
