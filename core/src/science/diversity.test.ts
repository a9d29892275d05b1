import { describe, expect, it } from 'vitest';
import {
  chao1,
  chao1Classic,
  fisherAlpha,
  fisherAlphaFromTotals,
  inverseSimpson,
  pielou,
  rarefiedRichness,
  richness,
  shannon,
  simpson,
  totalIndividuals,
} from './diversity';

const rel = (got: number | null, want: number): number => Math.abs((got as number) - want) / Math.abs(want);

// Worked numbers of docs/methods.md#chao1-bias-corrected (computed from the formulas; N = 60, S = 18).
const WORKED = [19, 12, 7, 3, 3, 2, 2, 2, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1] as const;

describe('diversity on the worked abundances of docs/methods.md (computed, rel 1e-10)', () => {
  it('has N = 60 and S = 18', () => {
    expect(totalIndividuals(WORKED)).toBe(60);
    expect(richness(WORKED)).toBe(18);
  });
  it('Shannon H\' = 2.2587587579', () => expect(rel(shannon(WORKED), 2.2587587579)).toBeLessThan(1e-10));
  it('Simpson 1 − D = 0.835', () => expect(rel(simpson(WORKED), 0.835)).toBeLessThan(1e-12));
  it('inverse Simpson 1/D = 6.0606060606', () =>
    expect(rel(inverseSimpson(WORKED), 6.0606060606)).toBeLessThan(1e-10));
  it('Pielou J = 0.7814768988', () => expect(rel(pielou(WORKED), 0.7814768988)).toBeLessThan(1e-9));
  it('bias-corrected Chao1 = 29.25', () => expect(chao1(WORKED)).toBe(29.25));
  it('Hurlbert E[S10] = 6.0846136783', () =>
    expect(rel(rarefiedRichness(WORKED, 10), 6.0846136783)).toBeLessThan(1e-10));
  it('Fisher alpha = 8.7185298805', () => expect(rel(fisherAlpha(WORKED), 8.7185298805)).toBeLessThan(1e-10));
});

describe('fisherAlphaFromTotals', () => {
  it('reproduces Fisher, Corbet & Williams (1943) Table 9, N = 100000, S = 100: α ≈ 10.96705 (read in a secondary quotation; rel 1e-4)', () => {
    expect(rel(fisherAlphaFromTotals(100, 100000), 10.96705)).toBeLessThan(1e-4);
  });
  it('gives the equation root 10.96716 for the same N, S (docs/methods.md#fishers-alpha, computed; rel 1e-6)', () => {
    expect(rel(fisherAlphaFromTotals(100, 100000), 10.96716)).toBeLessThan(1e-6);
  });
  it('solves S = α ln(1 + N/α) to 1e-12 relative over a wide range of S and N', () => {
    const cases: Array<[number, number]> = [[2, 3], [2, 1e9], [5, 6], [18, 60], [59, 60], [100, 101],
      [300, 1e6], [999_999, 1e6], [3, 1e12], [1e5, 1e12]];
    for (const [s, n] of cases) {
      const a = fisherAlphaFromTotals(s, n) as number;
      expect(a).toBeGreaterThan(0);
      // the residual in S translates to α through dS/dα; compare α with a perturbed root instead:
      const back = a * Math.log1p(n / a);
      expect(Math.abs(back - s) / s, `S = ${s}, N = ${n}`).toBeLessThan(1e-12);
    }
  });
  it('returns null only where no finite root exists: S = N (all singletons, α → ∞, one stem included) or N = 0', () => {
    expect(fisherAlphaFromTotals(60, 60)).toBeNull();
    expect(fisherAlphaFromTotals(1, 1)).toBeNull();
    expect(fisherAlphaFromTotals(0, 100)).toBeNull();
    expect(fisherAlphaFromTotals(0, 0)).toBeNull();
  });
  it('solves S = 1 (one species among N stems): N = 2 gives α = 0.79591 (equation of Fisher, Corbet & Williams 1943; root solved by hand, 1e-4)', () => {
    // Working by hand, f(α) = α ln(1 + 2/α) − 1, which rises with α:
    //   α = 0.5  → 0.5 · ln 5        = 0.5 · 1.60944 = 0.80472 → f < 0
    //   α = 1    → 1 · ln 3          = 1.09861                 → f > 0
    //   α = 0.8  → 0.8 · ln 3.5      = 0.8 · 1.25276 = 1.00221 → f > 0
    //   α = 0.79 → 0.79 · ln 3.53165 = 0.79 · 1.26176 = 0.99679 → f < 0
    //   linear interpolation: 0.79 + 0.01 · 0.00321 / (0.00321 + 0.00221) = 0.79592; one more bisection
    //   pair (0.7959 → 0.999997, 0.7960 → 1.000051) puts the root just above 0.7959.
    const a = fisherAlphaFromTotals(1, 2) as number;
    expect(Math.abs(a - 0.79591)).toBeLessThan(1e-4);
    expect(Math.abs(a * Math.log1p(2 / a) - 1)).toBeLessThan(1e-12);
    // S = 1 among more stems: a smaller α, still a finite root that satisfies the equation.
    const b = fisherAlphaFromTotals(1, 100) as number;
    expect(b).toBeGreaterThan(0);
    expect(b).toBeLessThan(a);
    expect(Math.abs(b * Math.log1p(100 / b) - 1)).toBeLessThan(1e-12);
  });
  it('rejects S > N and negative or non-finite input with an error naming the function', () => {
    expect(() => fisherAlphaFromTotals(5, 4)).toThrow(/fisherAlphaFromTotals/);
    expect(() => fisherAlphaFromTotals(-1, 4)).toThrow(/fisherAlphaFromTotals/);
    expect(() => fisherAlphaFromTotals(3, Number.NaN)).toThrow(/fisherAlphaFromTotals/);
  });
  it('grows without bound as S approaches N (α ≈ N²/(2(N − S)) for large α, series of ln(1 + x); rel 1e-2)', () => {
    const a = fisherAlphaFromTotals(999_999, 1e6) as number;
    expect(rel(a, 1e12 / 2)).toBeLessThan(1e-2);
  });
});

describe('Chao1 (fossil R package documentation, classic form; read)', () => {
  it('classic S + f1²/(2 f2) gives 14.5 for 4 5 1 1 2 0 0 1 3 0 8 45 23', () => {
    expect(chao1Classic([4, 5, 1, 1, 2, 0, 0, 1, 3, 0, 8, 45, 23])).toBe(14.5);
  });
  it('classic gives 7 for 4 5 0 0 2 0 0 0 3 0 8 45 23 (no singletons)', () => {
    expect(chao1Classic([4, 5, 0, 0, 2, 0, 0, 0, 3, 0, 8, 45, 23])).toBe(7);
  });
  it('classic is null when there are singletons but no doubletons; bias-corrected stays finite', () => {
    expect(chao1Classic([1, 1, 1, 5])).toBeNull();
    // computed by hand: S = 4, f1 = 3, f2 = 0 → 4 + 3·2/(2·1) = 7
    expect(chao1([1, 1, 1, 5])).toBe(7);
  });
});

describe('edge cases', () => {
  it('empty counts: richness 0, every estimator null', () => {
    for (const counts of [[], [0, 0]]) {
      expect(richness(counts)).toBe(0);
      expect(shannon(counts)).toBeNull();
      expect(simpson(counts)).toBeNull();
      expect(inverseSimpson(counts)).toBeNull();
      expect(pielou(counts)).toBeNull();
      expect(fisherAlpha(counts)).toBeNull();
      expect(rarefiedRichness(counts, 1)).toBeNull();
      expect(chao1(counts)).toBeNull();
      expect(chao1Classic(counts)).toBeNull();
    }
  });

  it('one species: H\' = 0, Simpson 0, inverse Simpson 1, Pielou null (definitions), Fisher finite (root of the equation)', () => {
    const one = [0, 12];
    expect(richness(one)).toBe(1);
    expect(shannon(one)).toBe(0);
    expect(simpson(one)).toBe(0);
    expect(inverseSimpson(one)).toBe(1);
    expect(pielou(one)).toBeNull();
    expect(fisherAlpha(one)).toBeCloseTo(fisherAlphaFromTotals(1, 12) as number, 15);
    expect(fisherAlpha(one)).toBeGreaterThan(0);
    expect(rarefiedRichness(one, 5)).toBe(1);
    expect(chao1(one)).toBe(1);
  });

  it('all singletons (S = N = 7): H\' = ln 7, J = 1, 1/D = 7, Fisher null, E[S_n] = n, Chao1 = 7 + 21 (by hand)', () => {
    const all = [1, 1, 1, 1, 1, 1, 1];
    expect(rel(shannon(all), Math.log(7))).toBeLessThan(1e-15);
    expect(rel(pielou(all), 1)).toBeLessThan(1e-15);
    expect(rel(inverseSimpson(all), 7)).toBeLessThan(1e-15);
    expect(fisherAlpha(all)).toBeNull();
    // drawing n of N singletons always yields n species
    expect(rel(rarefiedRichness(all, 3), 3)).toBeLessThan(1e-13);
    // 7 + 7·6/(2·(0 + 1)) = 28
    expect(chao1(all)).toBe(28);
  });

  it('N < n: rarefied richness is null; N = n gives S exactly', () => {
    const small = [10, 5, 3, 1]; // N = 19
    expect(rarefiedRichness(small, 50)).toBeNull();
    expect(rarefiedRichness(small, 19)).toBe(4);
  });

  it('rarefaction by hand: counts 2, 1 and n = 2 give 1 + (1 − C(2,2)/C(3,2)) = 5/3', () => {
    expect(rel(rarefiedRichness([2, 1], 2), 5 / 3)).toBeLessThan(1e-14);
  });

  it('huge N = 1e6: rarefaction does not overflow and matches the product form Π (N − Nᵢ − j)/(N − j) (rel 1e-12)', () => {
    // 200 species with counts 1..200 scaled so that N = 1e6 exactly (independent reference: log1p sum)
    const counts: number[] = [];
    let total = 0;
    for (let i = 1; i <= 199; i += 1) {
      const c = i * 50;
      counts.push(c);
      total += c;
    }
    counts.push(1e6 - total);
    expect(totalIndividuals(counts)).toBe(1e6);
    const n = 50;
    let want = 0;
    for (const c of counts) {
      let logRatio = 0;
      for (let j = 0; j < n; j += 1) logRatio += Math.log1p(-c / (1e6 - j));
      want += 1 - Math.exp(logRatio);
    }
    const got = rarefiedRichness(counts, n) as number;
    expect(Number.isFinite(got)).toBe(true);
    expect(rel(got, want)).toBeLessThan(1e-12);
    expect(fisherAlpha(counts)).toBeGreaterThan(0);
  });

  it('rejects negative, fractional or non-finite counts and bad n with errors naming the function', () => {
    expect(() => shannon([3, -1])).toThrow(/shannon/);
    expect(() => richness([1.5])).toThrow(/richness/);
    expect(() => chao1([Number.NaN])).toThrow(/chao1/);
    expect(() => rarefiedRichness([3, 2], 0)).toThrow(/rarefiedRichness/);
    expect(() => rarefiedRichness([3, 2], 2.5)).toThrow(/rarefiedRichness/);
  });
});
