import { describe, expect, it } from 'vitest';
import { diameterClasses } from './diameter-classes';

// Check values computed by hand: g = π (D/200)² per stem, times its expansion factor (1/0.5 ha on the
// main plot, 1/0.05 ha on the subplot).
describe('diameterClasses', () => {
  const dbh = [7, 12, 15, 34, 105];
  const w = [20, 2, 2, 2, 2];
  const classes = diameterClasses(dbh, w, 5);

  it('starts at the lowest measured diameter, then runs in 10 cm classes to an open class at 100 cm', () => {
    expect(classes.map((c) => [c.lowerCm, c.upperCm])).toEqual([
      [5, 10], [10, 20], [20, 30], [30, 40], [40, 50], [50, 60], [60, 70], [70, 80], [80, 90], [90, 100], [100, null],
    ]);
    expect(classes.map((c) => c.stems)).toEqual([1, 2, 0, 1, 0, 0, 0, 0, 0, 0, 1]);
  });

  it('expands each stem by its own area', () => {
    expect(classes[0].stemsHa).toBe(20);
    expect(classes[1].stemsHa).toBe(4);
    expect(classes[0].basalAreaM2Ha).toBeCloseTo(20 * Math.PI * 0.035 ** 2, 12); // 0.076969
    expect(classes[1].basalAreaM2Ha).toBeCloseTo(0.0579624, 6);
    expect(classes[3].basalAreaM2Ha).toBeCloseTo(0.181584, 5);
    expect(classes[10].basalAreaM2Ha).toBeCloseTo(1.731803, 5);
    // the classes add up to the plot's totals
    expect(classes.reduce((s, c) => s + c.stemsHa, 0)).toBe(28);
  });

  it('stops after the largest occupied class and refuses stems below the first class', () => {
    expect(diameterClasses([12, 18], [1, 1], 10).map((c) => c.lowerCm)).toEqual([10]);
    expect(diameterClasses([], [], 10)).toEqual([]);
    expect(() => diameterClasses([4], [1], 5)).toThrow(/below the first class/);
  });
});
