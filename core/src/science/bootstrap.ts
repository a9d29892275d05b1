// Generic pieces of the nonparametric bootstrap: case-resampling counts and percentile intervals.
// Formulas and check values: docs/methods.md#bootstrap-interval.
import type { Rng } from './random';

// Type 7 sample quantile Q(p) = x₍ⱼ₎ + g·(x₍ⱼ₊₁₎ − x₍ⱼ₎), h = (n − 1)p, j = ⌊h⌋, g = h − j (Hyndman & Fan 1996, Am. Stat. 50:361–365; R's default).
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) throw new RangeError('quantileSorted: no values');
  if (!(p >= 0 && p <= 1)) throw new RangeError(`quantileSorted: p must be in [0, 1], got ${p}`);
  const h = (n - 1) * p;
  const j = Math.floor(h);
  const g = h - j;
  const lo = sorted[j];
  if (g === 0 || j + 1 >= n) return lo;
  const hi = sorted[j + 1];
  if (lo === hi) return lo;
  return lo + g * (hi - lo);
}

// Percentile interval [Q(α/2), Q(1 − α/2)] of bootstrap replicates (Efron & Tibshirani 1993, An Introduction to the Bootstrap, §13.3); ±Infinity replicates stay in the ordering.
export function percentileInterval(replicates: ArrayLike<number>, alpha: number): { low: number; high: number } {
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`percentileInterval: alpha must be in (0, 1), got ${alpha}`);
  if (replicates.length === 0) throw new RangeError('percentileInterval: no replicates');
  const sorted = Float64Array.from(replicates);
  for (let i = 0; i < sorted.length; i++) {
    if (Number.isNaN(sorted[i])) throw new RangeError(`percentileInterval: replicate ${i} is NaN`);
  }
  sorted.sort();
  return { low: quantileSorted(sorted, alpha / 2), high: quantileSorted(sorted, 1 - alpha / 2) };
}

// Case resampling: n draws with replacement from n cases, returned as how often each case was drawn (Efron & Tibshirani 1993, §6.2).
// `counts` is a caller-owned buffer of length n, overwritten, so that replicate loops allocate nothing.
export function drawCaseCounts(rng: Rng, counts: Uint32Array): void {
  const n = counts.length;
  counts.fill(0);
  for (let k = 0; k < n; k++) counts[rng.int(n)]++;
}
