import { describe, expect, it } from 'vitest';
import {
  basalAreaWeightedFireDamage,
  DEFAULT_DISTURBANCE_OPTIONS,
  disturbanceIndex,
  fireScore,
  loggingRemovedBaFraction,
  loggingScore,
} from './disturbance';

// These scores are stemwise's own definitions (no published reference exists); expected values are
// computed by hand from the formulas in disturbance.ts, exact up to 1e-15.

describe('loggingRemovedBaFraction', () => {
  it('is logged stump BA / (live BA + logged stump BA): 1 / (3 + 1) = 0.25', () => {
    expect(loggingRemovedBaFraction(3, 1)).toBe(0.25);
  });
  it('is 0 with no stumps, 1 with only stumps, null when both are 0', () => {
    expect(loggingRemovedBaFraction(3, 0)).toBe(0);
    expect(loggingRemovedBaFraction(0, 2)).toBe(1);
    expect(loggingRemovedBaFraction(0, 0)).toBeNull();
  });
  it('rejects negative basal areas', () => {
    expect(() => loggingRemovedBaFraction(-1, 0)).toThrow(/loggingRemovedBaFraction/);
  });
});

describe('loggingScore (defaults: mean of min(1, f/0.5) and class/3)', () => {
  it('f = 0.25, class 2 → (0.5 + 2/3)/2 = 7/12', () => {
    expect(loggingScore(0.25, 2)).toBeCloseTo(7 / 12, 15);
  });
  it('saturates the stump term at f = 0.5: f = 0.8, class 3 → 1', () => {
    expect(loggingScore(0.8, 3)).toBe(1);
  });
  it('treats a null fraction as 0: class 1 → 1/6', () => {
    expect(loggingScore(null, 1)).toBeCloseTo(1 / 6, 15);
  });
  it('follows its options: f_full = 0.25, class weight 0.25 → 0.75·1 + 0.25·(1/3) = 5/6', () => {
    expect(loggingScore(0.25, 1, { removedFracAtFullScore: 0.25, loggingClassWeight: 0.25 })).toBeCloseTo(5 / 6, 15);
  });
  it('rejects classes outside 0..3 and bad options', () => {
    expect(() => loggingScore(0, 4)).toThrow(/loggingScore: logging_class/);
    expect(() => loggingScore(0, 1.5)).toThrow(/loggingScore: logging_class/);
    expect(() => loggingScore(0, 1, { removedFracAtFullScore: 0 })).toThrow(/loggingScore: removedFracAtFullScore/);
  });
  it('documents its defaults', () => {
    expect(DEFAULT_DISTURBANCE_OPTIONS).toEqual({ removedFracAtFullScore: 0.5, loggingClassWeight: 0.5, fireClassWeight: 0.5 });
  });
});

describe('fire', () => {
  it('weights stem fire damage by basal area: (0.1·0 + 0.3·2)/0.4 = 1.5', () => {
    expect(basalAreaWeightedFireDamage([0, 2], [0.1, 0.3])).toBeCloseTo(1.5, 15);
  });
  it('gives exactly 3 when every stem has damage 3, whatever rounding the sums carry (computed by hand: a mean of equal values)', () => {
    // Σ g·3 / Σ g is 3.0000000000000004 in floating point for these basal areas.
    expect(basalAreaWeightedFireDamage([3, 3, 3, 3], [0.0017, 0.0056, 0.0621, 0.0991])).toBe(3);
  });
  it('gives 0 without live basal area', () => {
    expect(basalAreaWeightedFireDamage([], [])).toBe(0);
  });
  it('fire_score = mean of d̄/3 and class/3: d̄ = 1.5, class 1 → (0.5 + 1/3)/2 = 5/12', () => {
    expect(fireScore(1.5, 1)).toBeCloseTo(5 / 12, 15);
  });
  it('rejects damage outside 0..3 and fire_class outside 0..3', () => {
    expect(() => basalAreaWeightedFireDamage([4], [1])).toThrow(/basalAreaWeightedFireDamage/);
    expect(() => fireScore(0, -1)).toThrow(/fireScore: fire_class/);
  });
});

describe('disturbanceIndex = 1 − (1 − L)(1 − F)', () => {
  it('L = 7/12, F = 5/12 → 1 − (5/12)(7/12) = 109/144', () => {
    expect(disturbanceIndex(7 / 12, 5 / 12)).toBeCloseTo(109 / 144, 15);
  });
  it('is 0 undisturbed and 1 when either score is 1', () => {
    expect(disturbanceIndex(0, 0)).toBe(0);
    expect(disturbanceIndex(1, 0.2)).toBe(1);
    expect(disturbanceIndex(0.3, 1)).toBe(1);
  });
  it('rejects scores outside [0, 1]', () => {
    expect(() => disturbanceIndex(1.1, 0)).toThrow(/disturbanceIndex/);
  });
});
