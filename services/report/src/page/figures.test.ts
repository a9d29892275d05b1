import { describe, expect, it } from 'vitest';
import { estimate, estimateInterval, sePlace, sharePercent, standardError } from './figures';

// Rule (docs/methods.md#rounding-on-the-pages; common practice, GUM JCGM 100:2008 §7.2.6, memory): the SE
// to two significant digits, the estimate and its interval to the same decimal place. Every expected
// value below is worked by hand from that rule.
describe('rounding to the precision of the standard error', () => {
  it('rounds a large total to the SE\'s second digit: SE 43,264,035 → 43,000,000, place 10⁶', () => {
    expect(sePlace(43_264_035)).toBe(6);
    expect(standardError(43_264_035)).toBe('43,000,000');
    expect(estimate(1_134_321_000, 43_264_035)).toBe('1,134,000,000');
    expect(estimateInterval(1_091_056_965, 1_177_585_035, 43_264_035)).toBe('1,091,000,000 – 1,178,000,000');
  });

  it('keeps decimals the SE supports, trailing zeros included: 12.3456 ± 0.0789 → 12.346 ± 0.079; 7.2 ± 0.25 → 7.20 ± 0.25', () => {
    expect(sePlace(0.0789)).toBe(-3);
    expect(estimate(12.3456, 0.0789)).toBe('12.346');
    expect(standardError(0.0789)).toBe('0.079');
    expect(estimate(7.2, 0.25)).toBe('7.20');
  });

  it('takes the place after rounding the SE: 9.96 → 10 (place 0), so 123.46 → 123', () => {
    expect(sePlace(9.96)).toBe(0);
    expect(standardError(9.96)).toBe('10');
    expect(estimate(123.46, 9.96)).toBe('123');
  });

  it('rounds negative values away from zero by magnitude, and never prints −0', () => {
    expect(estimate(-5.678, 0.123)).toBe('-5.68');
    expect(estimate(-1_234_567, 25_000)).toBe('-1,235,000');
    expect(estimate(-0.0004, 0.012)).toBe('0.000');
  });

  it('handles very small numbers: 0.004567 ± 0.000123 → 0.00457 ± 0.00012', () => {
    expect(sePlace(0.000123)).toBe(-5);
    expect(estimate(0.004567, 0.000123)).toBe('0.00457');
    expect(standardError(0.000123)).toBe('0.00012');
    // beyond 20 decimals, scientific notation to the same place: 3e-30 ± 1.2e-31 → place −32 → 3.00e-30
    expect(estimate(3e-30, 1.2e-31)).toBe('3.00e-30');
  });

  it('falls back to three significant figures without a usable SE (0 or missing): there is no precision to follow', () => {
    expect(sePlace(0)).toBeNull();
    expect(sePlace(null)).toBeNull();
    expect(estimate(123.456, 0)).toBe('123');
    expect(estimate(0.0123456, null)).toBe('0.0123');
    expect(standardError(0)).toBe('0');
    expect(estimate(null, 1)).toBe('–');
  });

  it('rounds shares as percentages to the precision of their SE: 0.26634 ± 0.01234 → 26.6 % (SE 1.2 points)', () => {
    expect(sharePercent(0.26634, 0.01234)).toBe('26.6 %');
    expect(sharePercent(0.26634, 0.000456)).toBe('26.634 %');
    expect(sharePercent(0.26634, null)).toBe('26.6 %');
  });
});
