import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitOls, fitPolynomial, informationCriteria, predictOls, predictPolynomial, RegressionError } from './regression';
import { R_CHECK_X, R_CHECK_Y } from '../../test/regression-fixture';

// NIST Statistical Reference Datasets (StRD), linear least squares: Pontius and Longley. The data
// and the certified values are read from the copies in ./fixtures (public reference data, layout
// reconstructed; values agree digit for digit with the GSL test suite, see docs/methods.md#least-squares-by-qr).
interface StrdFile {
  readonly rows: number[][];
  readonly estimates: number[];
  readonly sds: number[];
  readonly residualSd: number;
  readonly r2: number;
  readonly residualDf: number;
  readonly rss: number;
}

function readStrd(name: string): StrdFile {
  const lines = readFileSync(new URL(`../../test/fixtures/${name}`, import.meta.url), 'utf8').split('\n');
  const estimates: number[] = [];
  const sds: number[] = [];
  let residualSd = Number.NaN;
  let r2 = Number.NaN;
  let residualDf = Number.NaN;
  let rss = Number.NaN;
  let dataAt = -1;
  lines.forEach((line, i) => {
    const b = /^\s*B(\d+)\s+(\S+)\s+(\S+)\s*$/.exec(line);
    if (b) {
      estimates[Number(b[1])] = Number(b[2]);
      sds[Number(b[1])] = Number(b[3]);
    }
    const sd = /^\s*Standard Deviation\s+(\S+)\s*$/.exec(line);
    if (sd) residualSd = Number(sd[1]);
    const rs = /^\s*R-Squared\s+(\S+)\s*$/.exec(line);
    if (rs) r2 = Number(rs[1]);
    const res = /^Residual\s+(\d+)\s+(\S+)\s+\S+\s*$/.exec(line);
    if (res) {
      residualDf = Number(res[1]);
      rss = Number(res[2]);
    }
    if (/^Data:\s+y\b/.test(line)) dataAt = i;
  });
  const rows = lines
    .slice(dataAt + 1)
    .map((l) => l.trim())
    .filter((l) => l.length > 0)
    .map((l) => l.split(/\s+/).map(Number));
  return { rows, estimates, sds, residualSd, r2, residualDf, rss };
}

const relErr = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
// "≥ 9 significant digits of the certified values"
const NINE_DIGITS = 1e-9;

describe('fitPolynomial on NIST StRD Pontius (degree 2, condition number about 1.4e13)', () => {
  const cert = readStrd('nist_pontius.dat');
  const y = cert.rows.map((r) => r[0]);
  const x = cert.rows.map((r) => r[1]);
  const fit = fitPolynomial(x, y, 2);

  it('parses the 40 observations and 3 certified parameters', () => {
    expect(cert.rows).toHaveLength(40);
    expect(cert.estimates).toHaveLength(3);
  });

  it('reproduces the certified estimates and their standard deviations to 9 significant digits', () => {
    cert.estimates.forEach((b, i) => expect(relErr(fit.coefficients[i], b)).toBeLessThan(NINE_DIGITS));
    cert.sds.forEach((s, i) => expect(relErr(fit.standardErrors[i], s)).toBeLessThan(NINE_DIGITS));
  });

  it('reproduces the certified residual SD, R², residual df and residual sum of squares', () => {
    expect(relErr(fit.residualSd, cert.residualSd)).toBeLessThan(NINE_DIGITS);
    expect(relErr(fit.r2, cert.r2)).toBeLessThan(1e-13);
    expect(fit.df).toBe(cert.residualDf);
    expect(relErr(fit.rss, cert.rss)).toBeLessThan(NINE_DIGITS);
  });

  it('gives the same answer when the two columns are passed to fitOls directly (centring and scaling inside)', () => {
    const direct = fitOls(y, [x, x.map((v) => v * v)]);
    cert.estimates.forEach((b, i) => expect(relErr(direct.coefficients[i], b)).toBeLessThan(NINE_DIGITS));
    cert.sds.forEach((s, i) => expect(relErr(direct.standardErrors[i], s)).toBeLessThan(NINE_DIGITS));
  });

  it('computes log-likelihood, AIC and AICc from the certified RSS (computed by hand from the formulas, 1e-12 relative)', () => {
    // ℓ = −n/2 (ln 2π + ln(RSS/n) + 1), k = 3 coefficients + σ² = 4; AIC = −2ℓ + 8; AICc = AIC + 2·4·5/(40 − 5)
    const n = 40;
    const logLik = (-n / 2) * (Math.log(2 * Math.PI) + Math.log(cert.rss / n) + 1);
    expect(fit.k).toBe(4);
    expect(relErr(fit.logLik, logLik)).toBeLessThan(1e-9);
    expect(relErr(fit.aic, -2 * logLik + 8)).toBeLessThan(1e-9);
    expect(relErr(fit.aicc as number, -2 * logLik + 8 + 40 / 35)).toBeLessThan(1e-9);
  });

  it('predicts the fitted mean stably at the data and far from the centre', () => {
    const atMax = predictPolynomial(fit, 3e6);
    const b = cert.estimates;
    expect(relErr(atMax.mean, b[0] + b[1] * 3e6 + b[2] * 9e12)).toBeLessThan(1e-10);
    // at x = 0 the fitted mean is the intercept, whose SE is certified
    const at0 = predictPolynomial(fit, 0);
    expect(relErr(at0.mean, b[0])).toBeLessThan(NINE_DIGITS);
    expect(relErr(at0.se, cert.sds[0])).toBeLessThan(NINE_DIGITS);
  });
});

describe('fitOls on NIST StRD Longley (6 predictors, highly collinear)', () => {
  const cert = readStrd('nist_longley.dat');
  const y = cert.rows.map((r) => r[0]);
  const predictors = [1, 2, 3, 4, 5, 6].map((j) => cert.rows.map((r) => r[j]));
  const fit = fitOls(y, predictors);

  it('parses the 16 observations and 7 certified parameters', () => {
    expect(cert.rows).toHaveLength(16);
    expect(cert.estimates).toHaveLength(7);
  });

  it('reproduces the certified estimates and their standard deviations to 9 significant digits', () => {
    cert.estimates.forEach((b, i) => expect(relErr(fit.coefficients[i], b)).toBeLessThan(NINE_DIGITS));
    cert.sds.forEach((s, i) => expect(relErr(fit.standardErrors[i], s)).toBeLessThan(NINE_DIGITS));
  });

  it('reproduces the certified residual SD, R² and residual sum of squares', () => {
    expect(relErr(fit.residualSd, cert.residualSd)).toBeLessThan(NINE_DIGITS);
    expect(relErr(fit.r2, cert.r2)).toBeLessThan(1e-12);
    expect(fit.df).toBe(cert.residualDf);
    expect(relErr(fit.rss, cert.rss)).toBeLessThan(NINE_DIGITS);
  });

  it('derives adjusted R², t values and p-values from the certified values (computed from the formulas)', () => {
    // adj R² = 1 − (1 − R²)(n − 1)/(n − p)
    expect(relErr(fit.adjR2, 1 - ((1 - cert.r2) * 15) / 9)).toBeLessThan(1e-11);
    cert.estimates.forEach((b, i) => expect(relErr(fit.tValues[i], b / cert.sds[i])).toBeLessThan(NINE_DIGITS));
    // B1 has t = 0.177 on 9 df: far from significant; B3 has t = −4.14: p below 0.01
    // (t(0.995, 9) = 3.250, t table, memory)
    expect(fit.pValues[1]).toBeGreaterThan(0.5);
    expect(fit.pValues[3]).toBeLessThan(0.01);
  });

  it('predicts the fitted mean at an observation equal to ŷ from the certified coefficients', () => {
    const row = cert.rows[7];
    const expected = cert.estimates.reduce((s, b, i) => s + b * (i === 0 ? 1 : row[i]), 0);
    expect(relErr(predictOls(fit, row.slice(1)).mean, expected)).toBeLessThan(1e-9);
  });
});

describe('informationCriteria', () => {
  it('uses k = coefficients + 1 and leaves AICc empty when n − k − 1 ≤ 0', () => {
    // n = 4, 2 coefficients → k = 3, n − k − 1 = 0 (computed by hand)
    const ic = informationCriteria(4, 2, 2);
    expect(ic.k).toBe(3);
    expect(ic.aicc).toBeNull();
    expect(ic.aic).toBeCloseTo(-2 * (-2 * (Math.log(2 * Math.PI) + Math.log(0.5) + 1)) + 6, 12);
  });
});

describe('fitOls HC3 robust covariance', () => {
  // HC3 equals Σᵢ (β̂₍ᵢ₎ − β̂)(β̂₍ᵢ₎ − β̂)ᵀ, the sum of outer products of the leave-one-out changes
  // (MacKinnon & White 1985, J. Econometrics 29:305–325, via β̂₍ᵢ₎ − β̂ = −(XᵀX)⁻¹xᵢeᵢ/(1 − hᵢ); memory).
  // Checked here by refitting n times: an independent route. Tolerance 1e-9 relative.
  it('equals the sum of leave-one-out outer products on a small heteroskedastic data set', () => {
    const x = [0.1, 0.4, 0.5, 0.9, 1.3, 1.6, 2.2, 2.5, 3.1, 3.3, 3.9, 4.4];
    const d = x.map((v) => (v > 2 ? 1 : 0));
    const y = [1.2, 1.0, 2.1, 1.7, 3.4, 2.2, 4.9, 3.1, 6.5, 2.9, 7.8, 4.0];
    const fit = fitOls(y, [x, d], { hc3: true });
    const p = 3;
    const sum = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    for (let i = 0; i < x.length; i++) {
      const keep = (_: number, j: number) => j !== i;
      const loo = fitOls(y.filter(keep), [x.filter(keep), d.filter(keep)]);
      const delta = loo.coefficients.map((b, k) => b - fit.coefficients[k]);
      for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) sum[a][b] += delta[a] * delta[b];
    }
    const hc3 = fit.hc3!;
    for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) expect(relErr(hc3.covariance[a][b], sum[a][b])).toBeLessThan(1e-9);
    expect(hc3.standardErrors[1]).toBeCloseTo(Math.sqrt(sum[1][1]), 12);
  });

  it('is absent unless asked for', () => {
    expect(fitOls([1, 2, 4, 3], [[1, 2, 3, 4]]).hc3).toBeUndefined();
  });
});

describe('fitOls preconditions', () => {
  it('rejects too few points, non-finite values, a constant predictor and collinear columns by name', () => {
    const err = (f: () => unknown, code: string) => {
      try {
        f();
      } catch (e) {
        expect(e).toBeInstanceOf(RegressionError);
        expect((e as RegressionError).code).toBe(code);
        expect((e as Error).message).toMatch(/^fitOls|^fitPolynomial/);
        return;
      }
      throw new Error('expected a RegressionError');
    };
    err(() => fitOls([1, 2], [[1, 2]]), 'too_few_points');
    err(() => fitOls([1, 2, Number.NaN], [[1, 2, 3]]), 'bad_input');
    err(() => fitOls([1, 2, 3, 5], [[2, 2, 2, 2]]), 'rank_deficient');
    err(() => fitOls([1, 2, 3, 5], [[1, 2, 3, 4], [2, 4, 6, 8]]), 'rank_deficient');
    err(() => fitOls([1, 2, 3, 4], [[1, 2, 3, 4]]), 'perfect_fit');
    err(() => fitPolynomial([1, 1, 1, 1, 1], [1, 2, 3, 4, 5], 2), 'rank_deficient');
  });
});

// Cross-check against a general-purpose reference: R 4.2.2 (Debian r-base-core 4.2.2.20221110-2),
// `lm(y ~ x)` and `lm(y ~ x + I(x^2))`, summary(), logLik() and AIC() (R counts σ² in AIC's k, as we
// do), run on this machine on the data in core/test/regression-fixture.ts; printed with 15 digits.
// AICc is not in base R: computed from R's AIC by hand as AIC + 2k(k+1)/(n − k − 1). Tolerance 1e-10 relative.
describe('fitPolynomial agrees with R lm() on a 30-point data set', () => {
  it('degree 1', () => {
    const fit = fitPolynomial(R_CHECK_X, R_CHECK_Y, 1);
    const r = { b: [3.83934253597235, -1.00363840527804], se: [0.163925202393313, 0.281509859652448], p1: 1.33004460455127e-3 };
    r.b.forEach((b, i) => expect(relErr(fit.coefficients[i], b)).toBeLessThan(1e-10));
    r.se.forEach((s, i) => expect(relErr(fit.standardErrors[i], s)).toBeLessThan(1e-10));
    expect(relErr(fit.tValues[1], -3.5651980591981)).toBeLessThan(1e-10);
    expect(relErr(fit.pValues[1], r.p1)).toBeLessThan(1e-9);
    expect(relErr(fit.residualSd, 0.460201750625856)).toBeLessThan(1e-10);
    expect(relErr(fit.r2, 0.31221906791724)).toBeLessThan(1e-10);
    expect(relErr(fit.adjR2, 0.287655463199998)).toBeLessThan(1e-10);
    expect(relErr(fit.logLik, -18.250554003826068)).toBeLessThan(1e-10);
    expect(relErr(fit.aic, 42.501108007652135)).toBeLessThan(1e-10);
    expect(relErr(fit.aicc as number, 42.501108007652135 + 24 / 26)).toBeLessThan(1e-10);
  });

  it('degree 2', () => {
    const fit = fitPolynomial(R_CHECK_X, R_CHECK_Y, 2);
    const b = [3.18997649128641, 3.03173657383991, -4.03537497911795];
    const se = [0.166396260182416, 0.770293050875158, 0.744314539795041];
    const p = [2.97119035213152e-17, 5.2433828269261e-4, 9.83226358298887e-6];
    b.forEach((v, i) => expect(relErr(fit.coefficients[i], v)).toBeLessThan(1e-10));
    se.forEach((v, i) => expect(relErr(fit.standardErrors[i], v)).toBeLessThan(1e-10));
    p.forEach((v, i) => expect(relErr(fit.pValues[i], v)).toBeLessThan(1e-8));
    expect(relErr(fit.residualSd, 0.324273791071624)).toBeLessThan(1e-10);
    expect(relErr(fit.r2, 0.67070659780319)).toBeLessThan(1e-10);
    expect(relErr(fit.adjR2, 0.646314493936759)).toBeLessThan(1e-10);
    expect(relErr(fit.logLik, -7.202735685518064)).toBeLessThan(1e-10);
    expect(relErr(fit.aic, 22.405471371036128)).toBeLessThan(1e-10);
    expect(relErr(fit.aicc as number, 22.405471371036128 + 40 / 25)).toBeLessThan(1e-10);
  });
});

// Zero residual variance is not testable: a stable code, never a t of 0/0 (definitional; data invented).
describe('zero residual variance', () => {
  it('an exact straight line is a perfect fit, also when rounding leaves residuals of 1e-16', () => {
    const x = Array.from({ length: 12 }, (_, i) => i / 7);
    const err = (() => {
      try {
        fitPolynomial(x, x.map((v) => 0.1 + 0.3 * v), 1);
      } catch (e) {
        return e;
      }
    })();
    expect(err).toBeInstanceOf(RegressionError);
    expect((err as RegressionError).code).toBe('perfect_fit');
  });

  it('HC3 refuses a coefficient fitted only by points with zero residuals (code zero_variance)', () => {
    const x = [0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35, 0.8, 0.8, 0.8, 0.9, 0.9, 0.9];
    const y = [1.1, 1.9, 2.2, 3.4, 3.6, 4.9, 5.1, 5, 5, 5, 4, 4, 4];
    const cols = [x.map((v) => (v > 0.5 ? 0 : v - 0.5)), x.map((v) => (v > 0.5 ? v - 0.5 : 0)), x.map((v) => (v > 0.5 ? 1 : 0))];
    expect(() => fitOls(y, cols)).not.toThrow();
    expect(() => fitOls(y, cols, { hc3: true })).toThrow(expect.objectContaining({ code: 'zero_variance' }));
  });
});
