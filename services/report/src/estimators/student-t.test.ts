import { describe, expect, it } from 'vitest';
import { tMultiplier } from './student-t';

// Printed two-sided Student t table values, three decimals (memory; the table found in any statistics
// textbook appendix, e.g. Snedecor & Cochran, Statistical Methods). Tolerance 5e-4 absolute.
const TABLE: readonly [confidence: number, df: number, t: number][] = [
  [0.95, 9, 2.262],
  [0.95, 10, 2.228],
  [0.95, 29, 2.045],
  [0.95, 120, 1.98],
  [0.9, 10, 1.812],
  [0.99, 10, 3.169],
];

describe('tMultiplier', () => {
  it.each(TABLE)('at confidence %s and df %s is %s (printed t table, memory)', (c, df, t) => {
    expect(Math.abs(tMultiplier(c, df) - t)).toBeLessThan(5e-4);
  });

  it('tends to the normal 1.959964 for very large df (standard normal quantile, memory), 1e-5', () => {
    expect(Math.abs(tMultiplier(0.95, 1e7) - 1.959964)).toBeLessThan(1e-5);
  });

  it('accepts fractional (Satterthwaite) df and lies between its integer neighbours', () => {
    const t = tMultiplier(0.95, 22.6314);
    expect(t).toBeLessThan(tMultiplier(0.95, 22));
    expect(t).toBeGreaterThan(tMultiplier(0.95, 23));
  });

  it('rejects a confidence outside (0, 1) and a df that is not positive and finite', () => {
    expect(() => tMultiplier(1, 10)).toThrow(/^tMultiplier: confidence/);
    expect(() => tMultiplier(0.95, 0)).toThrow(/^tMultiplier: degrees of freedom/);
    expect(() => tMultiplier(0.95, Number.NaN)).toThrow(/degrees of freedom/);
  });
});
