// Seeded pseudo-random numbers for the demo inventory: the same seed gives the same inventory on
// every machine and every run (V8 computes Math.exp/log/sqrt with its own fdlibm port).

import { createRng } from '@stemwise/core/science';

// lowbias32 integer hash (C. Wellons, "Prospecting for hash functions", 2018): two xorshift-multiply rounds.
export function hash32(x: number): number {
  let h = x >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x7feb352d);
  h = Math.imul(h ^ (h >>> 15), 0x846ca68b);
  return (h ^ (h >>> 16)) >>> 0;
}

/** Folds a seed and a path of keys into one 32-bit seed, so that every plot has its own stream. */
export function deriveSeed(seed: number, ...keys: readonly (number | string)[]): number {
  if (!Number.isFinite(seed)) throw new RangeError(`deriveSeed: seed must be a finite number, got ${seed}`);
  let h = hash32(Math.trunc(seed) ^ 0x5bd1e995);
  for (const key of keys) {
    const k = typeof key === 'number' ? key >>> 0 : stringHash(key);
    h = hash32(h ^ hash32((k + 0x9e3779b9) >>> 0));
  }
  return h;
}

// FNV-1a 32-bit string hash (Fowler, Noll, Vo): h = (h ⊕ byte) · 16777619 per UTF-16 unit.
function stringHash(s: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 0x01000193);
  return h >>> 0;
}

/** A seeded random stream with the distributions the generator needs. */
export class Rng {
  private readonly source: { next(): number };
  private spareNormal: number | null = null;

  constructor(seed: number) {
    if (!Number.isFinite(seed)) throw new RangeError(`Rng: seed must be a finite number, got ${seed}`);
    this.source = createRng(seed);
  }

  /** Uniform on [0, 1): the seeded generator of @stemwise/core (mulberry32). */
  next(): number {
    return this.source.next();
  }

  /** Uniform on [min, max). */
  uniform(min: number, max: number): number {
    return min + (max - min) * this.next();
  }

  /** Integer uniform on [0, n). */
  int(n: number): number {
    if (!Number.isInteger(n) || n <= 0) throw new RangeError(`Rng.int: n must be a positive integer, got ${n}`);
    return Math.floor(this.next() * n);
  }

  /** True with probability p. */
  chance(p: number): boolean {
    return this.next() < p;
  }

  // Box–Muller transform (Box & Muller 1958): z = √(−2 ln u₁) cos(2π u₂), the sine term kept for the next call.
  normal(mean = 0, sd = 1): number {
    if (this.spareNormal !== null) {
      const z = this.spareNormal;
      this.spareNormal = null;
      return mean + sd * z;
    }
    const u1 = 1 - this.next(); // (0, 1], so the logarithm is finite
    const u2 = this.next();
    const r = Math.sqrt(-2 * Math.log(u1));
    this.spareNormal = r * Math.sin(2 * Math.PI * u2);
    return mean + sd * r * Math.cos(2 * Math.PI * u2);
  }

  // Inverse transform of the exponential distribution: x = −mean · ln(1 − u).
  exponential(mean: number): number {
    if (!(mean > 0)) throw new RangeError(`Rng.exponential: mean must be > 0, got ${mean}`);
    return -mean * Math.log(1 - this.next());
  }

  // Marsaglia & Tsang (2000, ACM TOMS 26:363–372): d = k − 1/3, c = 1/√(9d), accept v = (1 + c z)³ when ln u < z²/2 + d − d v + d ln v; k < 1 via X·U^(1/k).
  gamma(shape: number, scale = 1): number {
    if (!(shape > 0) || !(scale > 0)) {
      throw new RangeError(`Rng.gamma: shape and scale must be > 0, got ${shape}, ${scale}`);
    }
    if (shape < 1) return this.gamma(shape + 1, scale) * Math.pow(1 - this.next(), 1 / shape);
    const d = shape - 1 / 3;
    const c = 1 / Math.sqrt(9 * d);
    for (;;) {
      const z = this.normal();
      const v0 = 1 + c * z;
      if (v0 <= 0) continue;
      const v = v0 * v0 * v0;
      const u = 1 - this.next();
      if (Math.log(u) < 0.5 * z * z + d - d * v + d * Math.log(v)) return d * v * scale;
    }
  }

  // Beta(a, b) as X / (X + Y) with X ~ Gamma(a), Y ~ Gamma(b) (standard construction).
  beta(a: number, b: number): number {
    const x = this.gamma(a);
    const y = this.gamma(b);
    return x / (x + y);
  }

  // Knuth's multiplication method (TAOCP vol. 2, 3.4.1) on pieces of λ ≤ 20, summed: a sum of independent Poissons is Poisson.
  poisson(lambda: number): number {
    if (!(lambda >= 0) || !Number.isFinite(lambda)) {
      throw new RangeError(`Rng.poisson: lambda must be a finite number >= 0, got ${lambda}`);
    }
    let total = 0;
    let rest = lambda;
    while (rest > 0) {
      const piece = Math.min(rest, 20);
      rest -= piece;
      const limit = Math.exp(-piece);
      let product = this.next();
      while (product > limit) {
        total += 1;
        product *= this.next();
      }
    }
    return total;
  }

  // Negative binomial as a gamma–Poisson mixture: λ ~ Gamma(k, μ/k), X ~ Poisson(λ); mean μ, variance μ + μ²/k.
  negativeBinomial(mean: number, size: number): number {
    if (!(mean >= 0) || !(size > 0)) {
      throw new RangeError(`Rng.negativeBinomial: need mean >= 0 and size > 0, got ${mean}, ${size}`);
    }
    if (mean === 0) return 0;
    return this.poisson(this.gamma(size, mean / size));
  }

  // Sum of n Bernoulli(p) trials (n is small here: fire damage classes).
  binomial(n: number, p: number): number {
    if (!Number.isInteger(n) || n < 0 || !(p >= 0 && p <= 1)) {
      throw new RangeError(`Rng.binomial: need integer n >= 0 and p in [0, 1], got ${n}, ${p}`);
    }
    let k = 0;
    for (let i = 0; i < n; i++) if (this.next() < p) k += 1;
    return k;
  }

  /** One element of a non-empty array, uniformly. */
  choice<T>(items: readonly T[]): T {
    if (items.length === 0) throw new RangeError('Rng.choice: the array is empty');
    return items[this.int(items.length)];
  }

  /** An index drawn with probability proportional to its weight (non-negative, not all zero). */
  weightedIndex(weights: readonly number[]): number {
    let total = 0;
    for (const w of weights) {
      if (!(w >= 0)) throw new RangeError(`Rng.weightedIndex: weights must be >= 0, got ${w}`);
      total += w;
    }
    if (!(total > 0)) throw new RangeError('Rng.weightedIndex: the weights sum to zero');
    let u = this.next() * total;
    for (let i = 0; i < weights.length; i++) {
      u -= weights[i];
      if (u < 0) return i;
    }
    return weights.length - 1;
  }

  // Fisher–Yates shuffle (Durstenfeld 1964), in place on the caller's own array.
  shuffleInPlace<T>(items: T[]): T[] {
    for (let i = items.length - 1; i > 0; i--) {
      const j = this.int(i + 1);
      const tmp = items[i];
      items[i] = items[j];
      items[j] = tmp;
    }
    return items;
  }
}

/** A stream for one purpose (`'plot', 17`), independent of every other purpose and plot. */
export function rngFor(seed: number, ...keys: readonly (number | string)[]): Rng {
  return new Rng(deriveSeed(seed, ...keys));
}
