import { describe, expect, it } from 'vitest';
import { deriveSeed, Rng, rngFor } from './random';

// Moments of the distributions are the textbook ones (memory; e.g. Johnson, Kotz & Balakrishnan,
// Continuous Univariate Distributions): each sample check allows about 4 standard errors, and the
// seeds are fixed, so a check either always passes or always fails.

function moments(xs: readonly number[]): { mean: number; variance: number } {
  const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
  const variance = xs.reduce((a, x) => a + (x - mean) ** 2, 0) / (xs.length - 1);
  return { mean, variance };
}

function sample(n: number, draw: () => number): number[] {
  return Array.from({ length: n }, draw);
}

describe('Rng', () => {
  it('repeats the same stream for the same seed and a different one for another seed', () => {
    const a = sample(50, ((r) => () => r.next())(new Rng(42)));
    const b = sample(50, ((r) => () => r.next())(new Rng(42)));
    const c = sample(50, ((r) => () => r.next())(new Rng(43)));
    expect(a).toEqual(b);
    expect(a).not.toEqual(c);
  });

  it('gives uniform numbers in [0, 1) that pass a chi-square test on 10 bins', () => {
    const r = new Rng(1);
    const bins = new Array<number>(10).fill(0);
    const n = 100_000;
    let outside = 0;
    for (let i = 0; i < n; i++) {
      const u = r.next();
      if (!(u >= 0 && u < 1)) outside += 1;
      else bins[Math.floor(u * 10)] += 1;
    }
    expect(outside).toBe(0);
    const chi2 = bins.reduce((a, o) => a + (o - n / 10) ** 2 / (n / 10), 0);
    // 99.9 % point of chi-square with 9 df = 27.877 (standard tables, memory).
    expect(chi2).toBeLessThan(27.877);
  });

  it('draws normals with mean 0 and sd 1', () => {
    const r = new Rng(2);
    const m = moments(sample(40_000, () => r.normal()));
    expect(Math.abs(m.mean)).toBeLessThan(4 / Math.sqrt(40_000));
    expect(Math.abs(Math.sqrt(m.variance) - 1)).toBeLessThan(0.015);
  });

  it('draws exponentials with the requested mean', () => {
    const r = new Rng(3);
    const m = moments(sample(40_000, () => r.exponential(12)));
    expect(Math.abs(m.mean - 12)).toBeLessThan((4 * 12) / Math.sqrt(40_000));
  });

  it('draws gammas with mean kθ and variance kθ², also for shape below 1', () => {
    for (const [k, theta] of [[4.5, 2], [0.6, 3]] as const) {
      const r = new Rng(4);
      const m = moments(sample(40_000, () => r.gamma(k, theta)));
      expect(Math.abs(m.mean - k * theta) / (k * theta)).toBeLessThan(0.03);
      expect(Math.abs(m.variance - k * theta * theta) / (k * theta * theta)).toBeLessThan(0.06);
    }
  });

  it('draws betas with mean a / (a + b)', () => {
    const r = new Rng(5);
    const m = moments(sample(20_000, () => r.beta(1.15, 1.35)));
    expect(Math.abs(m.mean - 1.15 / 2.5)).toBeLessThan(0.008);
  });

  it('draws Poisson counts with mean = variance = λ and P(0) = e^−λ, for small and large λ', () => {
    const r = new Rng(6);
    const small = sample(40_000, () => r.poisson(2.5));
    const p0 = small.filter((x) => x === 0).length / small.length;
    expect(Math.abs(p0 - Math.exp(-2.5))).toBeLessThan(0.005);
    const ms = moments(small);
    expect(Math.abs(ms.mean - 2.5)).toBeLessThan(0.04);
    expect(Math.abs(ms.variance - 2.5)).toBeLessThan(0.1);
    const large = moments(sample(5_000, () => r.poisson(450)));
    expect(Math.abs(large.mean - 450)).toBeLessThan(4 * Math.sqrt(450 / 5_000));
    expect(Math.abs(large.variance - 450) / 450).toBeLessThan(0.08);
    expect(r.poisson(0)).toBe(0);
  });

  it('draws negative binomials with variance μ + μ²/k', () => {
    const r = new Rng(7);
    const m = moments(sample(20_000, () => r.negativeBinomial(500, 30)));
    expect(Math.abs(m.mean - 500) / 500).toBeLessThan(0.01);
    const expected = 500 + (500 * 500) / 30;
    expect(Math.abs(m.variance - expected) / expected).toBeLessThan(0.06);
  });

  it('draws binomials with mean np', () => {
    const r = new Rng(8);
    const m = moments(sample(20_000, () => r.binomial(3, 0.3)));
    expect(Math.abs(m.mean - 0.9)).toBeLessThan(0.025);
  });

  it('picks weighted indices in proportion to their weights and never a zero weight', () => {
    const r = new Rng(9);
    const counts = [0, 0, 0];
    for (let i = 0; i < 30_000; i++) counts[r.weightedIndex([1, 0, 3])] += 1;
    expect(counts[1]).toBe(0);
    expect(Math.abs(counts[2] / 30_000 - 0.75)).toBeLessThan(0.012);
  });

  it('shuffles into a permutation of the same items', () => {
    const items = Array.from({ length: 100 }, (_, i) => i);
    const shuffled = new Rng(10).shuffleInPlace([...items]);
    expect(shuffled).not.toEqual(items);
    expect([...shuffled].sort((a, b) => a - b)).toEqual(items);
  });

  it('rejects impossible parameters with an error naming the method', () => {
    const r = new Rng(11);
    expect(() => r.int(0)).toThrow(/Rng.int/);
    expect(() => r.poisson(-1)).toThrow(/Rng.poisson/);
    expect(() => r.gamma(0)).toThrow(/Rng.gamma/);
    expect(() => r.weightedIndex([0, 0])).toThrow(/Rng.weightedIndex/);
    expect(() => r.choice([])).toThrow(/Rng.choice/);
    expect(() => new Rng(Number.NaN)).toThrow(/Rng/);
  });
});

describe('deriveSeed', () => {
  it('gives each key path its own seed, the same every time', () => {
    expect(deriveSeed(7, 'plot', 1)).toBe(deriveSeed(7, 'plot', 1));
    const seeds = new Set([deriveSeed(7, 'plot', 1), deriveSeed(7, 'plot', 2), deriveSeed(8, 'plot', 1), deriveSeed(7, 'bad-rows')]);
    expect(seeds.size).toBe(4);
    expect(rngFor(7, 'plot', 3).next()).toBe(rngFor(7, 'plot', 3).next());
  });
});
