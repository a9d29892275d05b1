import { describe, expect, it } from 'vitest';
import { crpPartition, SpeciesPool } from './community';
import { Rng } from './random';
import { buildFlora } from './species';

describe('crpPartition', () => {
  it('labels species 0..S−1 in order of first appearance', () => {
    const p = crpPartition(300, 20, new Rng(1));
    let next = 0;
    for (const label of p.labels) {
      expect(label).toBeLessThanOrEqual(next);
      if (label === next) next += 1;
    }
    expect(next).toBe(p.species);
  });

  it('has the Ewens mean number of species E[S] = Σ θ/(θ + i), close to Fisher’s θ ln(1 + n/θ)', () => {
    // Ewens (1972, Theor. Popul. Biol. 3:87–112), mean of the number of alleles (formula from memory);
    // Fisher, Corbet & Williams (1943) S = α ln(1 + N/α) (docs/methods.md#fishers-alpha).
    const n = 450;
    const theta = 40;
    let expected = 0;
    for (let i = 0; i < n; i++) expected += theta / (theta + i);
    const rng = new Rng(2);
    const reps = 400;
    const values = Array.from({ length: reps }, () => crpPartition(n, theta, rng).species);
    const mean = values.reduce((a, b) => a + b, 0) / reps;
    const sd = Math.sqrt(values.reduce((a, v) => a + (v - mean) ** 2, 0) / (reps - 1));
    expect(Math.abs(mean - expected)).toBeLessThan((4 * sd) / Math.sqrt(reps));
    expect(Math.abs(expected / (theta * Math.log(1 + n / theta)) - 1)).toBeLessThan(0.01);
  });

  it('gives no species for no individuals and rejects a non-positive theta', () => {
    expect(crpPartition(0, 5, new Rng(3)).species).toBe(0);
    expect(() => crpPartition(10, 0, new Rng(3))).toThrow(/crpPartition/);
  });
});

describe('SpeciesPool', () => {
  const flora = buildFlora();

  it('draws only species of its forest type', () => {
    const pool = new SpeciesPool(flora, 'dry', 0.3);
    const rng = new Rng(4);
    for (let i = 0; i < 2000; i++) expect(flora.species[pool.draw(rng)].weights.dry).toBeGreaterThan(0);
  });

  it('draws distinct species, even past the pool size (strays from other types fill in)', () => {
    const pool = new SpeciesPool(flora, 'dry', 0.5);
    const rng = new Rng(5);
    const some = pool.drawDistinct(150, rng);
    expect(new Set(some).size).toBe(150);
    const many = pool.drawDistinct(pool.size + 20, rng);
    expect(new Set(many).size).toBe(pool.size + 20);
    expect(() => pool.drawDistinct(flora.species.length + 1, rng)).toThrow(/drawDistinct/);
  });

  it('favours pioneers in disturbed plots and shade-tolerant species in undisturbed ones', () => {
    const share = (x: number, guild: string) => {
      const pool = new SpeciesPool(flora, 'wet', x);
      const rng = new Rng(6);
      let hits = 0;
      for (let i = 0; i < 5000; i++) if (flora.species[pool.draw(rng)].guild === guild) hits += 1;
      return hits / 5000;
    };
    expect(share(1, 'pioneer')).toBeGreaterThan(2 * share(0, 'pioneer'));
    expect(share(1, 'shade_tolerant')).toBeLessThan(share(0, 'shade_tolerant') - 0.15);
  });
});
