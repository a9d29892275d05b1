import { describe, expect, it } from 'vitest';
import { assertCautionSettings, cautionFlag, DEFAULT_CAUTION } from './caution-flag';

// Thresholds: 20 plots and 20 % sampling error by default (common practice, no single published source).
describe('caution flag of an estimate', () => {
  it('flags fewer plots than the minimum, and a sampling error above the maximum, separately and together', () => {
    expect(cautionFlag(19, 10)).toBe('few_plots');
    expect(cautionFlag(20, 10)).toBe('none'); // 20 plots is enough: "fewer than 20"
    expect(cautionFlag(150, 20)).toBe('none'); // 20 % is not above 20 %
    expect(cautionFlag(150, 20.01)).toBe('wide_error');
    expect(cautionFlag(6, 56)).toBe('few_plots_wide_error');
  });
  it('says when there is no sampling error to judge (mean 0, one plot per stratum)', () => {
    expect(cautionFlag(40, null)).toBe('no_error_estimate');
    expect(cautionFlag(1, null)).toBe('few_plots');
  });
  it('follows the settings', () => {
    expect(cautionFlag(25, 12, { min_plots: 30, max_sampling_error_pct: 10 })).toBe('few_plots_wide_error');
    expect(DEFAULT_CAUTION).toEqual({ min_plots: 20, max_sampling_error_pct: 20 });
    expect(() => assertCautionSettings({ min_plots: 0, max_sampling_error_pct: 20 })).toThrow(/min_plots/);
    expect(() => assertCautionSettings({ min_plots: 5, max_sampling_error_pct: 0 })).toThrow(/max_sampling_error_pct/);
  });
});
