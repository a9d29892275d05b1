import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  lindMehlumTest,
  mitchellOldsShawTest,
  quadraticSlopeAt,
  quadraticVertex,
  vertexDeltaInterval,
  vertexFiellerInterval,
} from './hump';
import { simulateCurve } from '../../test/random-test-data';
import { fitPolynomial } from './regression';
import { R_CHECK_X, R_CHECK_Y } from '../../test/regression-fixture';

const relErr = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const range = (x: readonly number[]) => ({ min: Math.min(...x), max: Math.max(...x) });
const quad = fitPolynomial(R_CHECK_X, R_CHECK_Y, 2);

describe('quadraticVertex', () => {
  it('is −b1/(2·b2) (computed by hand) and null without curvature', () => {
    expect(quadraticVertex(8, -8)).toBe(0.5);
    expect(quadraticVertex(-3, 2)).toBe(0.75);
    expect(quadraticVertex(1, 0)).toBeNull();
    expect(() => quadraticVertex(Number.NaN, 1)).toThrow(/quadraticVertex/);
  });
});

// Reference: R 4.2.2 on this machine, lm(y ~ x + I(x^2)) on core/test/regression-fixture.ts, with vcov(lm) and
// the formulas written out in R (delta method g'Vg; Fieller's quadratic; slopes b1 + 2·b2·x and
// pt() for the one-sided Lind–Mehlum p-values). Tolerance 1e-9 relative.
describe('vertex intervals against R', () => {
  it('delta method: vertex, SE and 95 % interval', () => {
    const d = vertexDeltaInterval(quad, 0.05)!;
    expect(relErr(d.x, 0.3756449635446998)).toBeLessThan(1e-9);
    expect(relErr(d.se, 0.0336180534164545)).toBeLessThan(1e-9);
    expect(relErr(d.low, 0.3066664156401542)).toBeLessThan(1e-9);
    expect(relErr(d.high, 0.4446235114492454)).toBeLessThan(1e-9);
  });

  it('Fieller: 95 % interval', () => {
    const f = vertexFiellerInterval(quad, 0.05)!;
    expect(relErr(f.low, 0.277489534328211)).toBeLessThan(1e-9);
    expect(relErr(f.high, 0.432223087939701)).toBeLessThan(1e-9);
  });

  it('Fieller is unbounded (null) when the curvature is not significant', () => {
    // a nearly straight line: b2 far from significant
    const pts = simulateCurve(60, (x) => 1 + x, 1, 5);
    const fit = fitPolynomial(pts.map((p) => p.x), pts.map((p) => p.y), 2);
    expect(fit.pValues[2]).toBeGreaterThan(0.05);
    expect(vertexFiellerInterval(fit, 0.05)).toBeNull();
  });
});

describe('quadraticSlopeAt', () => {
  it('equals b1 and its SE of the same parabola refitted in powers of (x − x0) (an independent route, 1e-9)', () => {
    for (const x0 of [0, 0.37, 1]) {
      const shifted = fitPolynomial(R_CHECK_X.map((v) => v - x0), R_CHECK_Y, 2);
      const s = quadraticSlopeAt(quad, x0);
      expect(Math.abs(s.slope - shifted.coefficients[1])).toBeLessThan(1e-9 * Math.max(1, Math.abs(s.slope)));
      expect(relErr(s.se, shifted.standardErrors[1])).toBeLessThan(1e-9);
    }
  });
});

describe('lindMehlumTest', () => {
  it('matches the end slopes and the intersection–union p-value computed in R', () => {
    const lm = lindMehlumTest(quad, range(R_CHECK_X), 'hump');
    expect(relErr(lm.slopeLow, 3.03173657383991)).toBeLessThan(1e-9);
    expect(relErr(lm.seLow, 0.770293050875158)).toBeLessThan(1e-9);
    expect(relErr(lm.slopeHigh, -5.039013384395985)).toBeLessThan(1e-9);
    expect(relErr(lm.seHigh, 0.770293050875159)).toBeLessThan(1e-9);
    expect(relErr(lm.p, 2.62169141346305e-4)).toBeLessThan(1e-8);
    expect(lm.passes).toBe(true);
  });

  it('fails the mirror hypothesis (U shape) on the same data', () => {
    const lm = lindMehlumTest(quad, range(R_CHECK_X), 'u_shape');
    expect(lm.p).toBeGreaterThan(0.99);
    expect(lm.passes).toBe(false);
  });
});

describe('mitchellOldsShawTest', () => {
  it('passes a clear interior maximum, in the strong form too', () => {
    const mos = mitchellOldsShawTest(quad, range(R_CHECK_X), 'hump');
    expect(mos.curvatureSignificant).toBe(true);
    expect(mos.vertexInside).toBe(true);
    expect(mos.passes).toBe(true);
    expect(mos.strong).toBe(true);
    // p_b2 from R summary(lm): 9.83226358298887e-06
    expect(relErr(mos.pB2, 9.83226358298887e-6)).toBeLessThan(1e-8);
  });

  it('fails on NIST Pontius: b2 < 0 is highly significant but the vertex (≈ 1.158e8 from the certified B1, B2) lies far beyond x ≤ 3e6', () => {
    const lines = readFileSync(new URL('../../test/fixtures/nist_pontius.dat', import.meta.url), 'utf8').split('\n');
    const at = lines.findIndex((l) => /^Data:\s+y\b/.test(l));
    const rows = lines.slice(at + 1).map((l) => l.trim()).filter(Boolean).map((l) => l.split(/\s+/).map(Number));
    const x = rows.map((r) => r[1]);
    const fit = fitPolynomial(x, rows.map((r) => r[0]), 2);
    const mos = mitchellOldsShawTest(fit, range(x), 'hump');
    expect(mos.curvatureSignificant).toBe(true);
    // vertex from the NIST certified B1, B2: −0.732059160401003e-6 / (2 · −0.316081871345029e-14)
    expect(relErr(mos.vertex!, -0.732059160401003e-6 / (2 * -0.316081871345029e-14))).toBeLessThan(1e-9);
    expect(mos.vertexInside).toBe(false);
    expect(mos.passes).toBe(false);
  });

  it('does not call a U a hump', () => {
    const mos = mitchellOldsShawTest(fitPolynomial(R_CHECK_X, R_CHECK_Y.map((v) => -v), 2), range(R_CHECK_X), 'hump');
    expect(mos.curvatureSignificant).toBe(false);
    expect(mos.passes).toBe(false);
  });
});

// Statistical behaviour (seeded): a 95 % interval should cover the true vertex in about 95 % of
// repeated samples. 400 data sets, y = 10 + 8x − 8x² + N(0, 1), n = 200, true vertex 0.5. The
// acceptance band 0.91–0.99 is about ±3.5 binomial SE around 0.95 (computed).
describe('coverage of the vertex intervals', () => {
  it('delta and Fieller intervals cover the true vertex at close to the nominal rate', () => {
    let delta = 0;
    let fieller = 0;
    const sets = 400;
    for (let s = 0; s < sets; s++) {
      const pts = simulateCurve(200, (x) => 10 + 8 * x - 8 * x * x, 1, 1000 + s);
      const fit = fitPolynomial(pts.map((p) => p.x), pts.map((p) => p.y), 2);
      const d = vertexDeltaInterval(fit)!;
      const f = vertexFiellerInterval(fit);
      if (d.low <= 0.5 && d.high >= 0.5) delta++;
      if (f && f.low <= 0.5 && f.high >= 0.5) fieller++;
    }
    console.log(`vertex CI coverage over ${sets} sets: delta ${(delta / sets).toFixed(3)}, Fieller ${(fieller / sets).toFixed(3)}`);
    expect(delta / sets).toBeGreaterThanOrEqual(0.91);
    expect(delta / sets).toBeLessThanOrEqual(0.99);
    expect(fieller / sets).toBeGreaterThanOrEqual(0.91);
    expect(fieller / sets).toBeLessThanOrEqual(0.99);
  });
});

describe('preconditions', () => {
  it('names the function when given a straight-line fit', () => {
    const lin = fitPolynomial(R_CHECK_X, R_CHECK_Y, 1);
    expect(() => vertexDeltaInterval(lin)).toThrow(/vertexDeltaInterval/);
    expect(() => mitchellOldsShawTest(quad, { min: 1, max: 0 }, 'hump')).toThrow(/mitchellOldsShawTest/);
  });
});
