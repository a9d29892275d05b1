// Restricted (natural) cubic spline basis: linear beyond the outer knots, so the ends do not whip.
import { quantileSorted } from './bootstrap';

// Knot placement by quantiles of x for k knots (Harrell 2001, Regression Modeling Strategies, §2.4.6, Table 2.3): 4 → .05 .35 .65 .95, 5 → .05 .275 .5 .725 .95.
export function splineKnots(x: readonly number[], k: 4 | 5): number[] {
  const probs = k === 4 ? [0.05, 0.35, 0.65, 0.95] : [0.05, 0.275, 0.5, 0.725, 0.95];
  const sorted = Float64Array.from(x).sort();
  return probs.map((p) => quantileSorted(sorted, p));
}

// Columns x, and for j = 1…k−2: (x−tⱼ)₊³ − (x−t_{k−1})₊³ (t_k−tⱼ)/(t_k−t_{k−1}) + (x−t_k)₊³ (t_{k−1}−tⱼ)/(t_k−t_{k−1}), divided by (t_k−t₁)² (Harrell 2001, §2.4.5, eq. 2.25).
export function restrictedCubicSplineColumns(x: readonly number[], knots: readonly number[]): number[][] {
  const k = knots.length;
  if (k < 3) throw new RangeError(`restrictedCubicSplineColumns: at least 3 knots are needed, got ${k}`);
  for (let j = 1; j < k; j++) {
    if (!(knots[j] > knots[j - 1])) throw new RangeError('restrictedCubicSplineColumns: knots must be strictly increasing');
  }
  const tk = knots[k - 1];
  const tk1 = knots[k - 2];
  const norm = (tk - knots[0]) ** 2;
  const cube = (v: number): number => (v > 0 ? v * v * v : 0);
  const columns: number[][] = [Array.from(x)];
  for (let j = 0; j < k - 2; j++) {
    const tj = knots[j];
    columns.push(
      x.map((v) => (cube(v - tj) - (cube(v - tk1) * (tk - tj)) / (tk - tk1) + (cube(v - tk) * (tk1 - tj)) / (tk - tk1)) / norm),
    );
  }
  return columns;
}
