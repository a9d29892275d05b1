import { describe, expect, it } from 'vitest';
import { drawCaseCounts, percentileInterval, quantileSorted } from './bootstrap';
import { createRng } from './random';
import { normalDeviate } from '../../test/random-test-data';

describe('quantileSorted (Hyndman & Fan type 7)', () => {
  it('matches R quantile() defaults on 1..10 (computed by hand: h = 9p)', () => {
    const v = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
    expect(quantileSorted(v, 0)).toBe(1);
    expect(quantileSorted(v, 0.1)).toBeCloseTo(1.9, 14);
    expect(quantileSorted(v, 0.5)).toBeCloseTo(5.5, 14);
    expect(quantileSorted(v, 0.975)).toBeCloseTo(9.775, 14);
    expect(quantileSorted(v, 1)).toBe(10);
  });

  it('keeps infinite values in the ordering without producing NaN', () => {
    expect(quantileSorted([-Infinity, -Infinity, 0, 1], 0.1)).toBe(-Infinity);
    expect(quantileSorted([0, 1, Infinity], 0.9)).toBe(Infinity);
  });

  it('names itself on bad input', () => {
    expect(() => quantileSorted([], 0.5)).toThrow(/quantileSorted/);
    expect(() => quantileSorted([1], 2)).toThrow(/quantileSorted/);
  });
});

describe('percentileInterval', () => {
  it('sorts a copy and takes the α/2 and 1 − α/2 quantiles (computed by hand)', () => {
    const reps = [5, 3, 9, 1, 7, 2, 8, 4, 10, 6];
    const copy = [...reps];
    const { low, high } = percentileInterval(reps, 0.2);
    expect(low).toBeCloseTo(1.9, 14);
    expect(high).toBeCloseTo(9.1, 14);
    expect(reps).toEqual(copy);
  });

  it('rejects NaN replicates and a bad alpha by name', () => {
    expect(() => percentileInterval([1, Number.NaN], 0.05)).toThrow(/percentileInterval/);
    expect(() => percentileInterval([1, 2], 0)).toThrow(/percentileInterval/);
  });
});

describe('drawCaseCounts', () => {
  it('draws n cases with replacement: counts sum to n, about 1 − 1/e of cases appear (Efron & Tibshirani 1993, §6.2)', () => {
    const counts = new Uint32Array(10_000);
    drawCaseCounts(createRng(3), counts);
    const total = counts.reduce((s, c) => s + c, 0);
    const present = counts.reduce((s, c) => s + (c > 0 ? 1 : 0), 0);
    expect(total).toBe(10_000);
    // expected share 1 − (1 − 1/n)^n ≈ 0.6321, SD about 0.005
    expect(Math.abs(present / 10_000 - (1 - Math.exp(-1)))).toBeLessThan(0.02);
  });

  it('is reproducible from the seed', () => {
    const a = new Uint32Array(50);
    const b = new Uint32Array(50);
    drawCaseCounts(createRng(9), a);
    drawCaseCounts(createRng(9), b);
    expect([...a]).toEqual([...b]);
  });
});

// The percentile bootstrap of a mean should agree with the textbook t interval for normal data
// (x̄ ± t·s/√n): a check of the machinery on a statistic with a known sampling distribution.
describe('percentile bootstrap of a mean', () => {
  it('matches x̄ ± 1.96·s/√n within 10 % of the half-width on 400 normal values', () => {
    const rng = createRng(21);
    const data = Array.from({ length: 400 }, () => 50 + 10 * normalDeviate(rng));
    const n = data.length;
    const mean = data.reduce((s, v) => s + v, 0) / n;
    const sd = Math.sqrt(data.reduce((s, v) => s + (v - mean) ** 2, 0) / (n - 1));
    const counts = new Uint32Array(n);
    const reps = Array.from({ length: 2000 }, () => {
      drawCaseCounts(rng, counts);
      let s = 0;
      for (let i = 0; i < n; i++) s += counts[i] * data[i];
      return s / n;
    });
    const { low, high } = percentileInterval(reps, 0.05);
    const half = (1.966 * sd) / Math.sqrt(n); // t(0.975, 399) ≈ 1.966 (t table, memory)
    expect(Math.abs(low - (mean - half))).toBeLessThan(0.1 * half);
    expect(Math.abs(high - (mean + half))).toBeLessThan(0.1 * half);
  });
});
