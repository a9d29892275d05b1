import { describe, expect, it } from 'vitest';
import { restrictedCubicSplineColumns, splineKnots } from './spline';

describe('restricted cubic spline basis (Harrell 2001, Regression Modeling Strategies, §2.4.5, from memory)', () => {
  const knots = [0.1, 0.3, 0.5, 0.7, 0.9];

  it('is linear beyond the outer knots: equal steps in x give equal steps in every column (to 1e-12)', () => {
    const x = [1, 2, 3, 4];
    const cols = restrictedCubicSplineColumns(x, knots);
    for (const c of cols) expect(c[2] - c[1]).toBeCloseTo(c[1] - c[0], 12);
    const below = restrictedCubicSplineColumns([-3, -2, -1], knots);
    for (const c of below.slice(1)) expect(c).toEqual([0, 0, 0]);
  });

  it('has k − 1 columns, the first x itself, and a hand-computed value inside the knots', () => {
    const cols = restrictedCubicSplineColumns([0.4], knots);
    expect(cols).toHaveLength(4);
    expect(cols[0]).toEqual([0.4]);
    // j = 1: ((0.4 − 0.1)³ − 0 + 0) / (0.9 − 0.1)² = 0.027 / 0.64 (computed by hand)
    expect(cols[1][0]).toBeCloseTo(0.027 / 0.64, 14);
  });

  it('places knots at the quantiles of Harrell’s table and refuses tied knots', () => {
    const x = Array.from({ length: 101 }, (_, i) => i);
    splineKnots(x, 5).forEach((t, j) => expect(t).toBeCloseTo([5, 27.5, 50, 72.5, 95][j], 10));
    splineKnots(x, 4).forEach((t, j) => expect(t).toBeCloseTo([5, 35, 65, 95][j], 10));
    expect(() => restrictedCubicSplineColumns([1], [0, 0, 1])).toThrow(/restrictedCubicSplineColumns/);
  });
});
