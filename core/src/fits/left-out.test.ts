import { describe, expect, it } from 'vitest';
import { countLeftOut, leftOutReason, leftOutSentence, leftOutText, leftOutTotal } from './left-out';

const plot = (nIdentified: number, richness: number, fisher: number | null, disturbance: number | null = 0.2) => ({
  n_identified: nIdentified,
  richness,
  fisher_alpha: fisher,
  disturbance_index: disturbance,
  stems_ha: 400,
});

describe('plots left out of a fit', () => {
  it('names why Fisher alpha is empty: no identified stem, a single one, or S = N', () => {
    expect(leftOutReason(plot(0, 0, null), 'fisher_alpha')).toBe('no_identified_stem');
    expect(leftOutReason(plot(1, 1, null), 'fisher_alpha')).toBe('one_identified_stem');
    expect(leftOutReason(plot(7, 7, null), 'fisher_alpha')).toBe('all_singletons');
    expect(leftOutReason({ stems_ha: 0, qmd_cm: null }, 'qmd_cm')).toBe('no_live_stem');
    expect(leftOutReason({ stems_ha: 10 }, 'qmd_cm')).toBe('no_value');
  });

  it('counts each plot once per reason, metric first, and says so in a cell and in words', () => {
    const plots = [plot(12, 5, 2.1), plot(0, 0, null), plot(0, 0, null), plot(7, 7, null), plot(20, 6, 2.4, null), plot(30, 8, 3)];
    const counts = countLeftOut(plots, ['fisher_alpha', 'disturbance_index']);
    expect(counts).toEqual({ 'disturbance_index:no_value': 1, 'fisher_alpha:all_singletons': 1, 'fisher_alpha:no_identified_stem': 2 });
    expect(leftOutTotal(counts)).toBe(4);
    expect(leftOutText(counts)).toBe('disturbance_index:no_value=1;fisher_alpha:all_singletons=1;fisher_alpha:no_identified_stem=2');
    expect(leftOutSentence(leftOutText(counts))).toMatch(/^1 \(disturbance_index\) with no value; 1 \(fisher_alpha\) with every identified species with a single stem .*; 2 \(fisher_alpha\) with no live stem identified to species$/);
  });

  it('is empty, not zero-filled, when every plot has both values', () => {
    const counts = countLeftOut([plot(12, 5, 2.1)], ['fisher_alpha', 'disturbance_index']);
    expect(counts).toEqual({});
    expect(leftOutText(counts)).toBeNull();
    expect(leftOutTotal(counts)).toBe(0);
    expect(leftOutTotal(undefined)).toBeNull();
  });
});
