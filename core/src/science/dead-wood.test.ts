import { describe, expect, it } from 'vitest';
import { agbChave2005, agbChave2014 } from './allometry';
import { DEFAULT_STANDING_DEAD_SHARE, standingDeadBiomass } from './dead-wood';

const rel = (got: number, want: number): number => Math.abs(got - want) / Math.abs(want);

// Hand-computed stems: the allometric biomass of ρ = 0.6, D = 30 cm is 723.137398 kg with H = 25 m
// (Chave et al. 2014 eq. 4, computed) and 724.109348 kg without height (Chave et al. 2005 moist, computed),
// the check values of docs/methods.md#biomass-with-height; the dead stem keeps the share s of it.
describe('standingDeadBiomass (share of the allometric biomass; 0.7 by default, common practice)', () => {
  it('default share 0.7: 0.7 · 723.137398 = 506.1961786 kg (hand-computed, rel 1e-8)', () => {
    expect(DEFAULT_STANDING_DEAD_SHARE).toBe(0.7);
    expect(rel(standingDeadBiomass(agbChave2014(0.6, 30, 25)), 506.1961786)).toBeLessThan(1e-8);
  });
  it('another share: 0.5 · 724.109348 = 362.054674 kg (hand-computed, rel 1e-8)', () => {
    expect(rel(standingDeadBiomass(agbChave2005(0.6, 30, 'moist'), 0.5), 362.054674)).toBeLessThan(1e-8);
  });
  it('share 1 keeps the whole allometric biomass', () => {
    expect(standingDeadBiomass(723.137398, 1)).toBe(723.137398);
  });
  it('rejects a share outside (0, 1] and negative biomass, naming the function', () => {
    expect(() => standingDeadBiomass(100, 0)).toThrow(/standingDeadBiomass: share/);
    expect(() => standingDeadBiomass(100, 1.1)).toThrow(/standingDeadBiomass: share/);
    expect(() => standingDeadBiomass(-1)).toThrow(/standingDeadBiomass: allometric biomass/);
  });
});
