import { describe, expect, it } from 'vitest';
// @stdlib/math-base-special-gammaln is a general-purpose reference library (present in node_modules
// as a dependency of @stdlib/stats-base-dists-t-cdf); used here only as an outside check.
import gammaln from '@stdlib/math-base-special-gammaln';
import { logGamma, logGammaRatio } from './log-gamma';

describe('logGamma', () => {
  it('equals ln((n − 1)!) for integers 1..170 (exact identity Γ(n) = (n − 1)!, summed logs; rel 1e-13)', () => {
    let lnFactorial = 0; // ln((n − 1)!)
    for (let n = 1; n <= 170; n += 1) {
      if (n > 1) lnFactorial += Math.log(n - 1);
      const got = logGamma(n);
      if (lnFactorial === 0) expect(Math.abs(got)).toBeLessThan(1e-14);
      else expect(Math.abs(got - lnFactorial) / lnFactorial).toBeLessThan(1e-13);
    }
  });

  it('gives ln Γ(½) = ½ ln π (Abramowitz & Stegun 6.1.8; abs 1e-14)', () => {
    expect(Math.abs(logGamma(0.5) - 0.5 * Math.log(Math.PI))).toBeLessThan(1e-14);
  });

  it('agrees with @stdlib gammaln from 1e-10 to 1e12 (abs 2e-14 or rel 1e-14)', () => {
    const xs = [1e-10, 1e-3, 0.1, 0.3, 0.9, 1.1, 1.5, 1.9, 2.1, 2.5, 3.7, 7.3, 9.99, 14.5, 15, 15.5,
      33.3, 100.5, 1234.567, 1e6 + 0.5, 3.3e7, 1e12];
    for (const x of xs) {
      const ref = gammaln(x);
      const err = Math.abs(logGamma(x) - ref);
      expect(err <= 2e-14 || err / Math.abs(ref) <= 1e-14, `x = ${x}: ${logGamma(x)} vs ${ref}`).toBe(true);
    }
  });

  it('rejects x <= 0 and non-finite x with an error naming the function', () => {
    expect(() => logGamma(0)).toThrow(/logGamma/);
    expect(() => logGamma(-1.5)).toThrow(/logGamma/);
    expect(() => logGamma(Number.NaN)).toThrow(/logGamma/);
    expect(() => logGamma(Number.POSITIVE_INFINITY)).toThrow(/logGamma/);
  });
});

describe('logGammaRatio', () => {
  it('equals Σ ln(a + j), j = 0..d−1, for integer d (exact recurrence Γ(x + 1) = x Γ(x); rel 1e-13)', () => {
    for (const a of [0.5, 3, 14.9, 15, 20.25, 1000, 999_951, 1e9 + 0.5]) {
      for (const d of [1, 2, 7, 50, 200]) {
        let want = 0;
        for (let j = 0; j < d; j += 1) want += Math.log(a + j);
        const got = logGammaRatio(a, d);
        expect(Math.abs(got - want) / Math.abs(want), `a = ${a}, d = ${d}`).toBeLessThan(1e-13);
      }
    }
  });
  it('is 0 for d = 0 and rejects a <= 0', () => {
    expect(logGammaRatio(5, 0)).toBe(0);
    expect(() => logGammaRatio(0, 1)).toThrow(/logGammaRatio/);
  });
});
