import { describe, expect, it } from 'vitest';
import { normalTwoSidedP } from './normal';

describe('normalTwoSidedP', () => {
  // Standard normal table values (memory, any statistics text): P(|Z| > 1.959964) = 0.05, P(|Z| > 2.575829) = 0.01,
  // P(|Z| > 1) = 0.3173105; to 1e-6.
  it('matches printed two-sided normal tail areas', () => {
    expect(normalTwoSidedP(1.959964)).toBeCloseTo(0.05, 6);
    expect(normalTwoSidedP(-2.575829)).toBeCloseTo(0.01, 6);
    expect(normalTwoSidedP(1)).toBeCloseTo(0.3173105, 6);
    expect(normalTwoSidedP(0)).toBe(1);
  });

  it('refuses NaN, naming itself', () => {
    expect(() => normalTwoSidedP(Number.NaN)).toThrow(/normalTwoSidedP/);
  });
});
