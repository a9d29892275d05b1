import { loadConfig, ROOT_SHOOT_RELATION_NAMES } from '@stemwise/platform';
import { describe, expect, it } from 'vitest';
import {
  belowGroundBiomass,
  bgbMokany2006,
  DEFAULT_ROOT_SHOOT_BY_CLIMATE,
  IPCC_2006_TABLE_4_4,
  ROOT_SHOOT_RELATIONS,
  rootShootRatio,
  rootShootRelationOf,
  sdOfRange,
} from './root-shoot';

const rel = (got: number, want: number): number => Math.abs(got - want) / Math.abs(want);

// Check values: IPCC 2006 Guidelines for National Greenhouse Gas Inventories, Vol. 4, Ch. 4, Table 4.4
// "Ratio of below-ground biomass to above-ground biomass (R)", tropical domain (memory: the table's
// rows as recalled, not read from a copy). Each case names its row; SD by the uniform rule (max − min)/√12.
describe('rootShootRatio: IPCC 2006 Vol. 4 Table 4.4 (memory)', () => {
  const cases: ReadonlyArray<[string, Parameters<typeof rootShootRatio>[0], number, number, number]> = [
    // [row of Table 4.4, zone, plot AGB Mg/ha, R, range width]
    ['tropical rainforest, R 0.37, no range', 'tropical_rainforest', 300, 0.37, Number.NaN],
    ['tropical moist deciduous forest, AGB < 125 t/ha: R 0.20 (0.09–0.25)', 'tropical_moist_deciduous', 80, 0.2, 0.16],
    ['tropical moist deciduous forest, AGB > 125 t/ha: R 0.24 (0.22–0.33)', 'tropical_moist_deciduous', 200, 0.24, 0.11],
    ['tropical dry forest, AGB < 20 t/ha: R 0.56 (0.28–0.68)', 'tropical_dry', 12, 0.56, 0.4],
    ['tropical dry forest, AGB > 20 t/ha: R 0.28 (0.27–0.28)', 'tropical_dry', 90, 0.28, 0.01],
    ['tropical mountain systems, R 0.27 (0.27–0.28)', 'tropical_mountain', 150, 0.27, 0.01],
  ];
  for (const [row, zone, agb, ratio, width] of cases) {
    it(`${row} (read at AGB ${agb} Mg/ha)`, () => {
      const r = rootShootRatio(zone, agb);
      expect(r?.ratio).toBe(ratio);
      // A row without a range: 20 % of R (stemwise's rule); else the width over √12 (rel 1e-12).
      const sd = Number.isNaN(width) ? 0.2 * ratio : width / Math.sqrt(12);
      expect(rel(r?.sd as number, sd)).toBeLessThan(1e-12);
    });
  }
  it('a class boundary belongs to the upper class (125 t/ha: 0.24; just below: 0.20)', () => {
    expect(rootShootRatio('tropical_moist_deciduous', 125)?.ratio).toBe(0.24);
    expect(rootShootRatio('tropical_moist_deciduous', 124.999)?.ratio).toBe(0.2);
    expect(rootShootRatio('tropical_dry', 20)?.ratio).toBe(0.28);
    expect(rootShootRatio('tropical_dry', 0)?.ratio).toBe(0.56);
  });
  it('names the row it read, whose error every plot of that row shares (the class, or the equation)', () => {
    expect(rootShootRatio('tropical_moist_deciduous', 124.999)?.row).toBe('tropical_moist_deciduous:0');
    expect(rootShootRatio('tropical_moist_deciduous', 125)?.row).toBe('tropical_moist_deciduous:1');
    expect(rootShootRatio('tropical_rainforest', 400)?.row).toBe('tropical_rainforest:0');
    expect(rootShootRatio('mokany_2006', 80)?.row).toBe('mokany_2006');
  });
  it('every row lies inside its own range, and the classes of a zone tile [0, ∞)', () => {
    for (const zone of Object.values(IPCC_2006_TABLE_4_4)) {
      expect(zone.rows[0].agbFrom).toBe(0);
      expect(zone.rows[zone.rows.length - 1].agbBelow).toBe(Infinity);
      zone.rows.forEach((r, i) => {
        if (i > 0) expect(r.agbFrom).toBe(zone.rows[i - 1].agbBelow);
        if (r.range !== null) {
          expect(r.ratio).toBeGreaterThanOrEqual(r.range[0]);
          expect(r.ratio).toBeLessThanOrEqual(r.range[1]);
        }
      });
    }
  });
  it('rejects negative or non-finite biomass and an unknown relation, naming the function', () => {
    expect(() => rootShootRatio('tropical_dry', -1)).toThrow(/rootShootRatio: above-ground biomass/);
    expect(() => rootShootRatio('tropical_dry', Number.NaN)).toThrow(/rootShootRatio/);
    expect(() => rootShootRatio('boreal' as never, 100)).toThrow(/rootShootRatio: unknown relation boreal/);
  });
});

// Mokany, Raison & Prokushkin 2006, Global Change Biology 12:84–96: BGB = 0.489 AGB^0.890, Mg/ha
// (memory). Values computed from the equation by hand: 100^0.89 = e^(0.89 · 4.605170186) = 60.255958607.
describe('bgbMokany2006 (Mokany et al. 2006, memory)', () => {
  it('AGB 100 Mg/ha → BGB 0.489 · 60.255958607 = 29.465163759 Mg/ha (computed, rel 1e-9)', () => {
    expect(rel(bgbMokany2006(100), 29.465163759)).toBeLessThan(1e-9);
  });
  it('the ratio falls with biomass (exponent < 1): R = 0.489 · AGB^−0.11', () => {
    const r100 = rootShootRatio('mokany_2006', 100)?.ratio as number;
    const r400 = rootShootRatio('mokany_2006', 400)?.ratio as number;
    expect(rel(r100, 0.29465163759)).toBeLessThan(1e-9);
    expect(rel(r400 / r100, 4 ** -0.11)).toBeLessThan(1e-12);
  });
  it('has no ratio at AGB 0 (0/0) and gives BGB 0 there', () => {
    expect(rootShootRatio('mokany_2006', 0)).toBeNull();
    expect(belowGroundBiomass('mokany_2006', 0)).toBe(0);
  });
});

describe('belowGroundBiomass', () => {
  it('is R · AGB: 200 Mg/ha moist deciduous → 0.24 · 200 = 48 Mg/ha; 10 Mg/ha dry → 5.6 (hand-computed)', () => {
    expect(belowGroundBiomass('tropical_moist_deciduous', 200)).toBeCloseTo(48, 12);
    expect(belowGroundBiomass('tropical_dry', 10)).toBeCloseTo(5.6, 12);
  });
  it('equals the Mokany equation for the equation relation (rel 1e-14)', () => {
    expect(rel(belowGroundBiomass('mokany_2006', 250), bgbMokany2006(250))).toBeLessThan(1e-14);
  });
});

describe('defaults and the range rule', () => {
  it('every climate class maps to a known relation', () => {
    for (const r of Object.values(DEFAULT_ROOT_SHOOT_BY_CLIMATE)) expect(ROOT_SHOOT_RELATIONS).toContain(r);
  });
  it('a uniform on [0.09, 0.25] has SD 0.16/√12 = 0.0461880215 (computed)', () => {
    expect(rel(sdOfRange([0.09, 0.25], 0.2), 0.0461880215)).toBeLessThan(1e-9);
    expect(() => sdOfRange([0.3, 0.2], 0.25)).toThrow(/sdOfRange/);
  });
});

describe('the relation of each forest type (STEMWISE_ROOT_SHOOT, else by climate)', () => {
  it('the configuration accepts exactly the relations the science defines', () => {
    expect([...ROOT_SHOOT_RELATION_NAMES].sort()).toEqual([...ROOT_SHOOT_RELATIONS].sort());
  });
  it('a configured forest type uses its relation; the others the default of their climate', () => {
    const config = loadConfig({ STEMWISE_FOREST_TYPES: 'lowland:wet,hill:moist,scrub:dry', STEMWISE_ROOT_SHOOT: 'hill:tropical_mountain' });
    expect(rootShootRelationOf('hill', 'moist', config.rootShoot)).toBe('tropical_mountain');
    expect(rootShootRelationOf('lowland', 'wet', config.rootShoot)).toBe('tropical_rainforest');
    expect(rootShootRelationOf('scrub', 'dry', config.rootShoot)).toBe('tropical_dry');
  });
  it('the configuration refuses an unknown relation, an unknown forest type and a repeated one', () => {
    expect(() => loadConfig({ STEMWISE_ROOT_SHOOT: 'wet:boreal_forest' })).toThrow(/STEMWISE_ROOT_SHOOT: boreal_forest is not a root-to-shoot relation/);
    expect(() => loadConfig({ STEMWISE_ROOT_SHOOT: 'swamp:mokany_2006' })).toThrow(/STEMWISE_ROOT_SHOOT: swamp is not a forest type/);
    expect(() => loadConfig({ STEMWISE_ROOT_SHOOT: 'wet:mokany_2006,wet:tropical_dry' })).toThrow(/listed twice/);
  });
});
