// The standard normal distribution through the maintained @stdlib complementary error function (no approximation of our own).
import erfc from '@stdlib/math-base-special-erfc';

// p = 2·(1 − Φ(|z|)) = erfc(|z|/√2), the two-sided p-value of a z statistic (Abramowitz & Stegun 1964, eq. 7.1.2 and 26.2.29).
export function normalTwoSidedP(z: number): number {
  if (Number.isNaN(z)) throw new RangeError('normalTwoSidedP: z is NaN');
  return Math.min(1, erfc(Math.abs(z) / Math.SQRT2));
}
