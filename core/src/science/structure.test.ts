import { describe, expect, it } from 'vitest';
import { basalAreaM2, basalAreaPerHa, expansionFactor, quadraticMeanDiameter, stemsPerHa } from './structure';

const rel = (got: number | null, want: number): number => Math.abs((got as number) - want) / Math.abs(want);

describe('basalAreaM2', () => {
  it('is π (D/200)² (docs/methods.md#basal-area): D = 20 cm → 0.0314159265… m² (computed by hand; rel 1e-15)', () => {
    expect(rel(basalAreaM2(20), 0.031415926535897934)).toBeLessThan(1e-15);
  });
  it('D = 100 cm → π/4 m² (a 1 m disc, geometry; rel 1e-15)', () => {
    expect(rel(basalAreaM2(100), Math.PI / 4)).toBeLessThan(1e-15);
  });
  it('rejects dbh <= 0 and non-finite dbh with an error naming the function', () => {
    expect(() => basalAreaM2(0)).toThrow(/basalAreaM2/);
    expect(() => basalAreaM2(Number.NaN)).toThrow(/basalAreaM2/);
  });
});

describe('expansionFactor', () => {
  it('is 1/area_ha on the main plot and 1/subplot_area_ha on the subplot (docs/methods.md#expansion-factors)', () => {
    expect(expansionFactor(false, 0.5, 0.1)).toBe(2);
    expect(expansionFactor(true, 0.5, 0.1)).toBe(10);
  });
  it('rejects a subplot stem on a plot without a subplot', () => {
    expect(() => expansionFactor(true, 1, 0)).toThrow(/expansionFactor: subplot_area_ha/);
  });
});

describe('per-hectare structure (computed by hand)', () => {
  // 0.25 ha main plot with stems of 10, 20, 40 cm (w = 4); a 0.04 ha subplot with one 6 cm stem (w = 25).
  const dbh = [10, 20, 40, 6];
  const w = [4, 4, 4, 25];
  it('stems/ha = 3·4 + 25 = 37', () => expect(stemsPerHa(w)).toBe(37));
  it('basal area = 4π(0.05² + 0.1² + 0.2²) + 25π 0.03² = 0.2100π + 0.0225π = 0.2325π m²/ha (rel 1e-14)', () => {
    expect(rel(basalAreaPerHa(dbh, w), 0.2325 * Math.PI)).toBeLessThan(1e-14);
  });
  it('QMD = sqrt((4·(100 + 400 + 1600) + 25·36)/37) = sqrt(9300/37) cm (rel 1e-14)', () => {
    expect(rel(quadraticMeanDiameter(dbh, w), Math.sqrt(9300 / 37))).toBeLessThan(1e-14);
  });
  it('QMD is the diameter of the stem of mean basal area: sqrt(40000 G / (π N)) (identity; rel 1e-14)', () => {
    const g = basalAreaPerHa(dbh, w);
    expect(rel(quadraticMeanDiameter(dbh, w), Math.sqrt((40000 * g) / (Math.PI * 37)))).toBeLessThan(1e-14);
  });
  it('no stems: 0 stems/ha, 0 m²/ha, QMD null', () => {
    expect(stemsPerHa([])).toBe(0);
    expect(basalAreaPerHa([], [])).toBe(0);
    expect(quadraticMeanDiameter([], [])).toBeNull();
  });
  it('rejects arrays of different lengths and negative weights', () => {
    expect(() => basalAreaPerHa([10], [])).toThrow(/basalAreaPerHa/);
    expect(() => stemsPerHa([-1])).toThrow(/stemsPerHa/);
  });
});
