// Seeded pseudo-random numbers for resampling: deterministic, so a fit with the same data and
// seed gives the same bootstrap interval on every machine.

/** A seeded uniform generator. `next()` is in [0, 1); `int(n)` is an integer in [0, n). */
export interface Rng {
  next(): number;
  int(n: number): number;
}

// mulberry32 (T. Ettinger, public-domain generator, 32-bit state, period 2^32): state += 0x6D2B79F5, then two xorshift-multiply rounds.
export function createRng(seed: number): Rng {
  if (!Number.isFinite(seed)) throw new RangeError(`createRng: seed must be a finite number, got ${seed}`);
  let state = Math.trunc(seed) | 0;
  const next = (): number => {
    state = (state + 0x6d2b79f5) | 0;
    let t = Math.imul(state ^ (state >>> 15), 1 | state);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  // floor(u·n): bias below n/2^32, negligible for the sample sizes here (n ≤ 1e6 → < 2.4e-4 relative).
  const int = (n: number): number => {
    if (!Number.isInteger(n) || n <= 0) throw new RangeError(`createRng.int: n must be a positive integer, got ${n}`);
    return Math.floor(next() * n);
  };
  return { next, int };
}
