import { describe, expect, it } from 'vitest';
import { agbChave2005, agbChave2014, carbonFromBiomass, IPCC_2006_CARBON_FRACTION } from './allometry';

const rel = (got: number, want: number): number => Math.abs(got - want) / Math.abs(want);

// Check values for ρ = 0.6 g/cm³, D = 30 cm, H = 25 m (docs/methods.md#biomass-with-height), computed from the
// published equations (Chave et al. 2014 eq. 4; Chave et al. 2005 no-height models, coefficients from
// memory, corroborated in several public code files). Tolerance 1e-8 relative (values given to 9 digits).
describe('agbChave2014 (Chave et al. 2014, eq. 4)', () => {
  it('ρ = 0.6, D = 30, H = 25 → 723.137398 kg (computed)', () => {
    expect(rel(agbChave2014(0.6, 30, 25), 723.137398)).toBeLessThan(1e-8);
  });
  it('scales as (ρ D² H)^0.976: doubling H multiplies AGB by 2^0.976 (rel 1e-14)', () => {
    expect(rel(agbChave2014(0.6, 30, 50) / agbChave2014(0.6, 30, 25), 2 ** 0.976)).toBeLessThan(1e-14);
  });
  it('rejects non-positive inputs with an error naming the function', () => {
    expect(() => agbChave2014(0, 30, 25)).toThrow(/agbChave2014: wood density/);
    expect(() => agbChave2014(0.6, 30, Number.NaN)).toThrow(/agbChave2014: height/);
  });
});

describe('agbChave2005 (Chave et al. 2005, models without height)', () => {
  it('dry: 482.464126 kg (computed)', () => expect(rel(agbChave2005(0.6, 30, 'dry'), 482.464126)).toBeLessThan(1e-8));
  it('moist: 724.109348 kg (computed)', () =>
    expect(rel(agbChave2005(0.6, 30, 'moist'), 724.109348)).toBeLessThan(1e-8));
  it('wet: 530.352168 kg (computed)', () => expect(rel(agbChave2005(0.6, 30, 'wet'), 530.352168)).toBeLessThan(1e-8));
  it('is proportional to ρ (rel 1e-15)', () =>
    expect(rel(agbChave2005(0.9, 30, 'wet') / agbChave2005(0.45, 30, 'wet'), 2)).toBeLessThan(1e-15));
  it('rejects an unknown climate', () => {
    expect(() => agbChave2005(0.6, 30, 'boreal' as never)).toThrow(/agbChave2005: climate/);
  });
});

describe('carbonFromBiomass (IPCC 2006 Vol. 4 Table 4.3, memory: 0.47)', () => {
  it('uses 0.47 by default', () => {
    expect(IPCC_2006_CARBON_FRACTION).toBe(0.47);
    expect(carbonFromBiomass(100)).toBeCloseTo(47, 12);
  });
  it('accepts another fraction and rejects impossible ones', () => {
    expect(carbonFromBiomass(100, 0.5)).toBe(50);
    expect(() => carbonFromBiomass(100, 1.2)).toThrow(/carbonFromBiomass/);
    expect(() => carbonFromBiomass(-1)).toThrow(/carbonFromBiomass/);
  });
});
