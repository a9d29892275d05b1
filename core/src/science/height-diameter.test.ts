import { describe, expect, it } from 'vitest';
import {
  DEFAULT_MIN_HEIGHTS,
  fitHeightDiameter,
  hasEnoughHeights,
  heightModelBiomassShift,
  type HeightDiameterModel,
  MAX_PREDICTED_HEIGHT_M,
  predictHeight,
} from './height-diameter';
import { agbChave2014 } from './allometry';

const rel = (got: number, want: number): number => Math.abs(got - want) / Math.abs(want);

// Chave et al. 2014 eq. 6a at E = 0 (memory, corroborated in public code; docs/methods.md#height-diameter-model).
const A = 0.893;
const B = 0.76;
const C = -0.034;
const eq6a = (d: number): number => Math.exp(A + B * Math.log(d) + C * Math.log(d) ** 2);

function diameters(count: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < count; i += 1) out.push(10 + (140 * i) / (count - 1)); // 10 … 150 cm
  return out;
}

describe('fitHeightDiameter on heights generated exactly from eq. 6a (E = 0)', () => {
  const d = diameters(40);
  const model = fitHeightDiameter(d, d.map(eq6a));

  it('recovers a = 0.893, b = 0.760, c = −0.0340 (abs 1e-10)', () => {
    expect(Math.abs(model.a - A)).toBeLessThan(1e-10);
    expect(Math.abs(model.b - B)).toBeLessThan(1e-10);
    expect(Math.abs(model.c - C)).toBeLessThan(1e-10);
  });
  it('reports n, the dbh range, RSE ≈ 0 and R² ≈ 1', () => {
    expect(model.n).toBe(40);
    expect(model.dbhMinCm).toBe(10);
    expect(model.dbhMaxCm).toBe(150);
    expect(model.rse).toBeLessThan(1e-12);
    expect(Math.abs((model.r2 as number) - 1)).toBeLessThan(1e-12);
  });
  it('predicts H(30) = 21.858571 m (docs/methods.md#height-diameter-model, computed from eq. 6a; rel 1e-7)', () => {
    expect(rel(predictHeight(model, 30), 21.858571)).toBeLessThan(1e-7);
  });
});

describe('fit statistics and the Baskerville correction (computed by hand)', () => {
  // Two stems per diameter with ln H = eq. 6a ± δ: the residuals ±δ are orthogonal to 1, ln D and
  // (ln D)², so OLS returns eq. 6a exactly, SSE = n δ² and RSE = δ sqrt(n / (n − 3)).
  const delta = 0.2;
  const d: number[] = [];
  const h: number[] = [];
  for (const di of diameters(20)) {
    d.push(di, di);
    h.push(eq6a(di) * Math.exp(delta), eq6a(di) * Math.exp(-delta));
  }
  const model = fitHeightDiameter(d, h);
  const rse = delta * Math.sqrt(40 / 37);

  it('keeps the coefficients of eq. 6a (abs 1e-10)', () => {
    expect(Math.abs(model.a - A)).toBeLessThan(1e-10);
    expect(Math.abs(model.b - B)).toBeLessThan(1e-10);
    expect(Math.abs(model.c - C)).toBeLessThan(1e-10);
  });
  it('RSE = δ sqrt(40/37) and R² = 1 − SSE/SST (rel 1e-12)', () => {
    expect(rel(model.rse, rse)).toBeLessThan(1e-12);
    const lnH = h.map(Math.log);
    const mean = lnH.reduce((s, v) => s + v, 0) / lnH.length;
    const sst = lnH.reduce((s, v) => s + (v - mean) ** 2, 0);
    expect(rel(model.r2 as number, 1 - (40 * delta * delta) / sst)).toBeLessThan(1e-12);
  });
  it('multiplies predictions by exp(RSE²/2) (Baskerville 1972): H(30) = 21.858571 · exp(RSE²/2)', () => {
    expect(rel(model.biasCorrection, Math.exp((rse * rse) / 2))).toBeLessThan(1e-12);
    expect(rel(predictHeight(model, 30), 21.858571 * Math.exp((rse * rse) / 2))).toBeLessThan(1e-7);
  });
});

describe('least squares on noisy data', () => {
  it('leaves residuals orthogonal to 1, ln D and (ln D)² (normal equations; abs 1e-10)', () => {
    // deterministic scatter of ±25 % around eq. 6a
    const d = diameters(60);
    const h = d.map((di, i) => eq6a(di) * (1 + 0.25 * Math.sin(i * 1.7)));
    const m = fitHeightDiameter(d, h);
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    for (let i = 0; i < d.length; i += 1) {
      const l = Math.log(d[i]);
      const e = Math.log(h[i]) - (m.a + m.b * l + m.c * l * l);
      s0 += e;
      s1 += e * l;
      s2 += e * l * l;
    }
    expect(Math.abs(s0)).toBeLessThan(1e-10);
    expect(Math.abs(s1)).toBeLessThan(1e-10);
    expect(Math.abs(s2)).toBeLessThan(1e-10);
    expect(m.rse).toBeGreaterThan(0.05);
  });
});

describe('minHeights, extrapolation and the 100 m cap', () => {
  it('needs DEFAULT_MIN_HEIGHTS = 30 measured heights by default (common practice)', () => {
    expect(DEFAULT_MIN_HEIGHTS).toBe(30);
    expect(hasEnoughHeights(29)).toBe(false);
    expect(hasEnoughHeights(30)).toBe(true);
    expect(hasEnoughHeights(5, 5)).toBe(true);
    expect(() => hasEnoughHeights(5, 3)).toThrow(/hasEnoughHeights/);
  });
  it('refuses to fit below minHeights, telling the caller to use the no-height models', () => {
    const d = diameters(10);
    expect(() => fitHeightDiameter(d, d.map(eq6a))).toThrow(/fitHeightDiameter: 10 measured heights.*Chave et al\. 2005/);
    expect(fitHeightDiameter(d, d.map(eq6a), { minHeights: 10 }).n).toBe(10);
  });
  it('refuses fewer than 3 distinct diameters and non-positive values', () => {
    const d = Array.from({ length: 30 }, (_, i) => (i % 2 === 0 ? 20 : 40));
    expect(() => fitHeightDiameter(d, d.map(eq6a))).toThrow(/fewer than 3 distinct diameters/);
    const same = Array.from({ length: 30 }, () => 25);
    expect(() => fitHeightDiameter(same, same.map(eq6a))).toThrow(/all diameters are equal/);
    const good = diameters(30);
    const bad = good.map(eq6a);
    bad[3] = 0;
    expect(() => fitHeightDiameter(good, bad)).toThrow(/fitHeightDiameter: dbh and height must be/);
  });
  it('predicts outside the fitted range without clamping D, but caps H at 100 m', () => {
    const model: HeightDiameterModel = {
      a: A, b: B, c: C, n: 40, rse: 0, r2: 1, dbhMinCm: 10, dbhMaxCm: 150, biasCorrection: 1,
    };
    expect(rel(predictHeight(model, 5), eq6a(5))).toBeLessThan(1e-14);
    expect(rel(predictHeight(model, 300), eq6a(300))).toBeLessThan(1e-14);
    const tall: HeightDiameterModel = { ...model, a: 3, b: 0.5, c: 0 }; // exp(3) · 400^0.5 ≈ 402 m
    expect(predictHeight(tall, 400)).toBe(MAX_PREDICTED_HEIGHT_M);
  });
});

describe('heightModelBiomassShift (the bound on a plot biomass change behind the height-model tolerance, docs/methods.md#height-model-releases)', () => {
  // Chave et al. 2014 eq. 6a at E = 0 (a = 0.893, b = 0.760, c = −0.0340), fitted on 10–150 cm, no bias correction.
  const base = { a: 0.893, b: 0.76, c: -0.034, n: 100, rse: 0, r2: 1, dbhMinCm: 10, dbhMaxCm: 150, biasCorrection: 1 };

  it('is 0 for the same model', () => {
    expect(heightModelBiomassShift(base, base)).toBe(0);
  });

  it('a shift of a by ln 1.01 (every height 1 % taller) moves biomass by 1.01^0.976 − 1 (AGB ∝ H^0.976, Chave et al. 2014 eq. 4; computed by hand)', () => {
    expect(heightModelBiomassShift(base, { ...base, a: base.a + Math.log(1.01) })).toBeCloseTo(0.0097588, 7);
    // the Baskerville factor counts like a
    expect(heightModelBiomassShift(base, { ...base, biasCorrection: 1.01 })).toBeCloseTo(0.0097588, 7);
  });

  it('finds the largest change inside the range, at the vertex of the quadratic (computed by hand)', () => {
    // Δc = 0.01, Δb = −0.02 ln 30: ln(H₁/H₀) = 0.01 ((ln D)² − 2 ln 30 ln D), lowest at D = 30 cm: −0.01 (ln 30)²
    // (the ends, 10 and 150 cm, give only −0.1036 and −0.0898)
    const to = { ...base, b: base.b - 0.02 * Math.log(30), c: base.c + 0.01 };
    expect(heightModelBiomassShift(base, to)).toBeCloseTo(1 - Math.exp(-0.976 * 0.01 * Math.log(30) ** 2), 12);
  });

  it('bounds the biomass ratio of every diameter in the range (checked on a grid with predictHeight and agbChave2014)', () => {
    const to = { ...base, a: 0.95, b: 0.7, c: -0.03, dbhMinCm: 5, biasCorrection: 1.02 };
    const bound = heightModelBiomassShift(base, to);
    let worst = 0;
    for (let d = 5; d <= 150; d += 0.25) worst = Math.max(worst, Math.abs(agbChave2014(0.6, d, predictHeight(to, d)) / agbChave2014(0.6, d, predictHeight(base, d)) - 1));
    expect(worst).toBeLessThanOrEqual(bound + 1e-12);
    expect(worst).toBeGreaterThan(bound * 0.99);
  });
});
