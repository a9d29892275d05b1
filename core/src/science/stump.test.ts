import { describe, expect, it } from 'vitest';
import { DEFAULT_STUMP_TO_DBH, dbhFromStump } from './stump';

// Check values computed by hand from D = a + b · D_stump (docs/methods.md#stump-diameter-to-dbh).
describe('dbhFromStump', () => {
  it('applies the default proportional rule b = 0.8 (common practice, no published source)', () => {
    expect(DEFAULT_STUMP_TO_DBH).toEqual({ interceptCm: 0, slope: 0.8 });
    expect(dbhFromStump(50)).toBeCloseTo(40, 12); // 0.8 · 50, computed
    expect(dbhFromStump(12.5)).toBeCloseTo(10, 12); // 0.8 · 12.5, computed
  });

  it('applies a set linear relation with an intercept', () => {
    expect(dbhFromStump(30, { interceptCm: 2.1, slope: 0.79 })).toBeCloseTo(25.8, 12); // 2.1 + 0.79 · 30, computed
    expect(dbhFromStump(30, { interceptCm: -1.5, slope: 0.9 })).toBeCloseTo(25.5, 12); // −1.5 + 0.9 · 30, computed
  });

  it('refuses a stump diameter or relation that gives no positive DBH, naming itself', () => {
    expect(() => dbhFromStump(0)).toThrow(/dbhFromStump: stump diameter/);
    expect(() => dbhFromStump(Number.NaN)).toThrow(/dbhFromStump/);
    expect(() => dbhFromStump(10, { interceptCm: 0, slope: 0 })).toThrow(/slope > 0/);
    expect(() => dbhFromStump(1, { interceptCm: -5, slope: 0.8 })).toThrow(/no positive DBH/);
  });
});
