import { describe, expect, it } from 'vitest';
import { createRng } from './random';

describe('createRng (mulberry32)', () => {
  it('repeats the same sequence for the same seed and differs for another seed', () => {
    const a = createRng(42);
    const b = createRng(42);
    const c = createRng(43);
    const sa = Array.from({ length: 20 }, () => a.next());
    const sb = Array.from({ length: 20 }, () => b.next());
    const sc = Array.from({ length: 20 }, () => c.next());
    expect(sa).toEqual(sb);
    expect(sa).not.toEqual(sc);
  });

  it('draws uniformly: 20-bin chi-square below the 0.999 critical value 43.82 (19 df; chi-square table, memory)', () => {
    const rng = createRng(2024);
    const bins = new Array<number>(20).fill(0);
    const draws = 200_000;
    let sum = 0;
    let outside = 0;
    for (let i = 0; i < draws; i++) {
      const u = rng.next();
      if (!(u >= 0 && u < 1)) outside++;
      sum += u;
      bins[Math.floor(u * 20)]++;
    }
    const expected = draws / 20;
    expect(outside).toBe(0);
    const chi2 = bins.reduce((s, o) => s + ((o - expected) ** 2) / expected, 0);
    expect(chi2).toBeLessThan(43.82);
    // mean of U(0,1) is 1/2 with SD √(1/12/n) ≈ 6.5e-4; allow 5 SD
    expect(Math.abs(sum / draws - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / draws));
  });

  it('int(n) covers 0..n−1 and nothing else', () => {
    const rng = createRng(7);
    const seen = new Set<number>();
    for (let i = 0; i < 1000; i++) seen.add(rng.int(5));
    expect([...seen].sort()).toEqual([0, 1, 2, 3, 4]);
    expect(() => rng.int(0)).toThrow(/createRng\.int/);
  });

  it('rejects a non-finite seed by name', () => {
    expect(() => createRng(Number.NaN)).toThrow(/createRng/);
  });
});
