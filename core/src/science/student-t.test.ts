import { describe, expect, it } from 'vitest';
import { studentTCdf, studentTDensity, studentTQuantile, studentTTwoSidedP, tMultiplier } from './student-t';

describe('studentTQuantile', () => {
  // Critical values of Student's t as printed (3 decimals) in the t table at the back of standard
  // statistics texts and handbooks — recalled from memory, each one a commonly quoted entry — except
  // t(0.975, 10), given to 10 digits as commonly quoted (memory; 2.228 in printed tables). Tolerance: half a unit of the last
  // printed digit.
  const table: Array<[p: number, df: number, t: number, tol: number]> = [
    [0.975, 10, 2.228138852, 5e-10],
    [0.975, 1, 12.706, 5e-4],
    [0.975, 2, 4.303, 5e-4],
    [0.975, 30, 2.042, 5e-4],
    [0.975, 120, 1.98, 5e-4],
    [0.95, 1, 6.314, 5e-4],
    [0.95, 5, 2.015, 5e-4],
    [0.99, 10, 2.764, 5e-4],
    [0.995, 20, 2.845, 5e-4],
    [0.9, 60, 1.296, 5e-4],
  ];
  it.each(table)('t(%s, df=%s) matches the printed table value %s', (p, df, t, tol) => {
    expect(Math.abs(studentTQuantile(p, df) - t)).toBeLessThanOrEqual(tol);
  });

  // Closed forms (computed by hand from the densities): ν = 1 is the Cauchy law, t_p = tan(π(p − ½));
  // ν = 2 has t_p = (2p − 1)/√(2p(1 − p)). Tolerance 1e-12 relative.
  it('agrees with the closed forms for 1 and 2 degrees of freedom', () => {
    for (const p of [0.6, 0.9, 0.975, 0.995, 0.01]) {
      const cauchy = Math.tan(Math.PI * (p - 0.5));
      expect(studentTQuantile(p, 1)).toBeCloseTo(cauchy, 12 - Math.ceil(Math.log10(Math.abs(cauchy) + 1)));
      const two = (2 * p - 1) / Math.sqrt(2 * p * (1 - p));
      expect(Math.abs(studentTQuantile(p, 2) - two) / Math.abs(two)).toBeLessThan(1e-12);
    }
  });

  it('names itself when p or the degrees of freedom are out of range', () => {
    expect(() => studentTQuantile(1, 5)).toThrow(/studentTQuantile/);
    expect(() => studentTQuantile(0.5, 0)).toThrow(/studentTQuantile/);
  });
});

describe('studentTTwoSidedP', () => {
  it('returns α at the two-sided critical value (t(0.975,10) = 2.228138852, memory, see docs/methods.md#student-t; tolerance 1e-9)', () => {
    expect(studentTTwoSidedP(2.228138852, 10)).toBeCloseTo(0.05, 9);
    expect(studentTTwoSidedP(-2.228138852, 10)).toBeCloseTo(0.05, 9);
  });

  it('matches the Cauchy closed form p = 1 − 2·atan(|t|)/π for ν = 1 (computed by hand, 1e-13)', () => {
    for (const t of [0, 0.5, 3, 40]) {
      expect(studentTTwoSidedP(t, 1)).toBeCloseTo(1 - (2 * Math.atan(t)) / Math.PI, 13);
    }
  });

  it('keeps tiny p-values instead of rounding them to zero', () => {
    const p = studentTTwoSidedP(40, 30);
    expect(p).toBeGreaterThan(0);
    expect(p).toBeLessThan(1e-25);
  });

  it('is symmetric to the cdf: p = 2·F(−|t|)', () => {
    expect(studentTTwoSidedP(1.3, 7)).toBeCloseTo(2 * studentTCdf(-1.3, 7), 15);
  });
});

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

  it('gives the quantile itself when asked again (remembered), at each confidence apart', () => {
    for (const [c, df] of [[0.95, 7], [0.9, 7], [0.95, 7.25], [0.99, 7]] as const) {
      const first = tMultiplier(c, df);
      expect(first).toBe(studentTQuantile((1 + c) / 2, df));
      expect(tMultiplier(c, df)).toBe(first);
    }
    expect(tMultiplier(0.9, 7)).toBeLessThan(tMultiplier(0.95, 7));
  });

  it('rejects a confidence outside (0, 1) and a df that is not positive and finite', () => {
    expect(() => tMultiplier(1, 10)).toThrow(/^tMultiplier: confidence/);
    expect(() => tMultiplier(0.95, 0)).toThrow(/^tMultiplier: degrees of freedom/);
    expect(() => tMultiplier(0.95, Number.NaN)).toThrow(/degrees of freedom/);
  });
});

describe('studentTDensity', () => {
  it('the density is the derivative of the cdf (central difference of the quantile, df 3 and 50)', () => {
    for (const df of [3, 50]) {
      for (const p of [0.02, 0.3, 0.5, 0.9]) {
        const e = 1e-6;
        const slope = (studentTQuantile(p + e, df) - studentTQuantile(p - e, df)) / (2 * e);
        expect(Math.abs(slope * studentTDensity(studentTQuantile(p, df), df) - 1)).toBeLessThan(1e-5);
      }
    }
    // f(0; 1) = 1/π (Cauchy)
    expect(studentTDensity(0, 1)).toBeCloseTo(1 / Math.PI, 12);
  });
  it('refuses degrees of freedom that are not positive', () => {
    expect(() => studentTDensity(0, 0)).toThrow(/studentTDensity: degrees of freedom/);
  });
});
