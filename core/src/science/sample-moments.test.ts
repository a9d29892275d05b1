import { describe, expect, it } from 'vitest';
import * as ss from 'simple-statistics';
import { EstimatorInputError } from './estimator-errors';
import { sampleMean, sampleVariance } from './sample-moments';

describe('sampleMean and sampleVariance', () => {
  it('match NIST StRD NumAcc1 (certified mean 10000002, sd 1; memory), tolerance 1e-12 relative', () => {
    const x = [10000001, 10000003, 10000002];
    expect(sampleMean(x)).toBeCloseTo(10000002, 5);
    expect(Math.abs(Math.sqrt(sampleVariance(x)) - 1)).toBeLessThan(1e-12);
  });

  it('match NIST StRD NumAcc3 (1001 values, certified mean 1000000.2, sd 0.1; memory), tolerance 1e-8 relative', () => {
    const x = [1000000.2];
    for (let i = 0; i < 500; i++) x.push(1000000.1, 1000000.3);
    expect(Math.abs(sampleMean(x) - 1000000.2) / 1000000.2).toBeLessThan(1e-12);
    expect(Math.abs(Math.sqrt(sampleVariance(x)) - 0.1) / 0.1).toBeLessThan(1e-8);
  });

  it('agree with simple-statistics 7.12 (general-purpose library) on stratum s1 of the docs/methods.md#stratified-estimator example, 1e-12 relative', () => {
    const x = [152, 170, 188, 141, 163, 177, 159, 166, 181, 149];
    expect(sampleMean(x)).toBeCloseTo(ss.mean(x), 10);
    expect(Math.abs(sampleVariance(x) - ss.sampleVariance(x)) / ss.sampleVariance(x)).toBeLessThan(1e-12);
    // computed by hand: mean 1646/10 = 164.6, Σ(y − ȳ)² = 1994.4, s² = 1994.4/9 = 221.6
    expect(sampleVariance(x)).toBeCloseTo(221.6, 10);
  });

  it('do not mutate their input', () => {
    const x = Object.freeze([3, 1, 2]);
    expect(sampleVariance(x)).toBe(1);
    expect(x).toEqual([3, 1, 2]);
  });

  it('reject empty samples, a single value for the variance, and non-finite values, naming the function', () => {
    expect(() => sampleMean([])).toThrow(/^sampleMean:/);
    expect(() => sampleVariance([4])).toThrow(/^sampleVariance: needs at least two values/);
    expect(() => sampleMean([1, Number.NaN])).toThrow(EstimatorInputError);
    expect(() => sampleVariance([1, Number.POSITIVE_INFINITY])).toThrow(/index 1/);
  });
});
