import { describe, expect, it } from 'vitest';
import { diameterClasses, figuresAtThreshold, figuresInRange, measuredFromCm, plotStandTable, type ExpandedStems } from './stand-table';

const ba = (d: number): number => Math.PI * (d / 200) ** 2;
function stems(list: ReadonlyArray<[dbh: number, weight: number, agbKg: number]>): ExpandedStems {
  return { dbhCm: list.map((s) => s[0]), weight: list.map((s) => s[1]), basalAreaM2: list.map((s) => ba(s[0])), agbKg: list.map((s) => s[2]) };
}

describe('diameterClasses', () => {
  it('runs in 10 cm classes from the threshold and ends with an open class from the first bound at or above 100 cm (stemwise choice)', () => {
    const c = diameterClasses(10);
    expect(c.map((x) => x.lowerCm)).toEqual([10, 20, 30, 40, 50, 60, 70, 80, 90, 100]);
    expect(c.at(-2)).toEqual({ lowerCm: 90, upperCm: 100 });
    expect(c.at(-1)).toEqual({ lowerCm: 100, upperCm: null });
    expect(diameterClasses(5).map((x) => x.lowerCm)).toEqual([5, 15, 25, 35, 45, 55, 65, 75, 85, 95, 105]);
    expect(diameterClasses(120)).toEqual([{ lowerCm: 120, upperCm: null }]);
    expect(() => diameterClasses(0)).toThrow(/diameterClasses/);
  });
});

describe('measuredFromCm', () => {
  it('is the smaller minimum with a subplot, the plot minimum without', () => {
    expect(measuredFromCm(20, 0.1, 5)).toBe(5);
    expect(measuredFromCm(10, 0, 5)).toBe(10);
    expect(measuredFromCm(10, 0.1, 12)).toBe(10);
    expect(() => measuredFromCm(-1, 0, 5)).toThrow(/measuredFromCm: dbh_min_cm/);
  });
});

describe('figures by diameter', () => {
  // Main plot w = 2 (0.5 ha), subplot w = 10 (0.1 ha); AGB per stem invented round numbers.
  const s = stems([[7, 10, 10], [12, 10, 50], [25, 2, 300], [55, 2, 2000], [104, 2, 9000]]);

  it('adds w, w·g and w·B/1000 over the stems in range (computed by hand)', () => {
    const f = figuresInRange(s, 10, 20);
    expect(f.stemsHa).toBe(10);
    expect(f.basalAreaM2Ha).toBeCloseTo(10 * ba(12), 14);
    expect(f.agbMgHa).toBeCloseTo(0.5, 14); // 10 · 50 kg
    const open = figuresInRange(s, 100, null);
    expect(open).toEqual({ stemsHa: 2, basalAreaM2Ha: 2 * ba(104), agbMgHa: 18 });
  });

  it('gives the figures from the threshold up only when the plot measured every stem from there', () => {
    const f = figuresAtThreshold(s, 10, 5);
    expect(f?.stemsHa).toBe(16); // 10 + 2 + 2 + 2: the 7 cm subplot stem is below the threshold
    expect(f?.agbMgHa).toBeCloseTo((10 * 50 + 2 * 300 + 2 * 2000 + 2 * 9000) / 1000, 12); // 23.1
    expect(figuresAtThreshold(s, 10, 20)).toBeNull();
    expect(figuresAtThreshold(s, 10, 10)).not.toBeNull();
  });

  it('puts each stem in its class and leaves empty the classes below where the plot was measured (hand computation)', () => {
    const classes = diameterClasses(10);
    const table = plotStandTable(s, classes, 5);
    expect(table.map((f) => f?.stemsHa)).toEqual([10, 2, 0, 0, 2, 0, 0, 0, 0, 2]);
    expect(table[1]?.basalAreaM2Ha).toBeCloseTo(2 * ba(25), 14);
    expect(table[4]?.agbMgHa).toBeCloseTo(4, 14);
    const from20 = plotStandTable(s, classes, 20);
    expect(from20[0]).toBeNull();
    expect(from20[1]?.stemsHa).toBe(2);
    const from12 = plotStandTable(s, classes, 12);
    expect(from12[0]).toBeNull(); // the 10–20 class was measured from 12 cm only: left empty
    // The classes together are the figures from the threshold up.
    const sum = table.reduce((a, f) => a + (f?.agbMgHa ?? 0), 0);
    expect(sum).toBeCloseTo(figuresAtThreshold(s, 10, 5)?.agbMgHa ?? Number.NaN, 12);
  });
});
