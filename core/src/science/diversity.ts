// Species diversity of one sample, from per-species counts of individuals (abundances).
// Formulas, sources and check values: docs/methods.md#diversity.
// Every function takes `readonly number[]` of non-negative integer counts; zeros are allowed and
// ignored (a species listed but absent), so S counts only species with at least one individual.
// Functions that are undefined for a sample return null rather than 0 or NaN.

import { logGammaRatio } from './log-gamma';

function assertCounts(fn: string, counts: readonly number[]): number {
  let total = 0;
  for (let i = 0; i < counts.length; i += 1) {
    const c = counts[i];
    if (!Number.isInteger(c) || c < 0) {
      throw new RangeError(`${fn}: counts must be non-negative integers (got ${c} at index ${i})`);
    }
    total += c;
  }
  return total;
}

// N = Σ nᵢ (number of individuals)
export function totalIndividuals(counts: readonly number[]): number {
  return assertCounts('totalIndividuals', counts);
}

// S = #{i : nᵢ > 0} (observed species richness)
export function richness(counts: readonly number[]): number {
  assertCounts('richness', counts);
  let s = 0;
  for (const c of counts) if (c > 0) s += 1;
  return s;
}

// H' = −Σ pᵢ ln pᵢ = ln N − (1/N) Σ nᵢ ln nᵢ — Shannon (1948); null when N = 0
export function shannon(counts: readonly number[]): number | null {
  const n = assertCounts('shannon', counts);
  if (n === 0) return null;
  let sum = 0;
  for (const c of counts) if (c > 0) sum += c * Math.log(c);
  return Math.max(0, Math.log(n) - sum / n);
}

function sumSquaredProportions(counts: readonly number[], n: number): number {
  let sum = 0;
  for (const c of counts) sum += c * c;
  return sum / (n * n);
}

// 1 − D, D = Σ pᵢ² — Simpson (1949) as 1 − Σp² (Gini–Simpson); null when N = 0
export function simpson(counts: readonly number[]): number | null {
  const n = assertCounts('simpson', counts);
  if (n === 0) return null;
  return 1 - sumSquaredProportions(counts, n);
}

// 1/D, D = Σ pᵢ² — inverse Simpson (Hill number of order 2); null when N = 0
export function inverseSimpson(counts: readonly number[]): number | null {
  const n = assertCounts('inverseSimpson', counts);
  if (n === 0) return null;
  return 1 / sumSquaredProportions(counts, n);
}

// J = H' / ln S — Pielou (1966) evenness; null when S ≤ 1 (ln 1 = 0: evenness undefined)
export function pielou(counts: readonly number[]): number | null {
  const s = richness(counts);
  if (s <= 1) return null;
  const h = shannon(counts) as number;
  return h / Math.log(s);
}

// S = α ln(1 + N/α) solved for α — Fisher, Corbet & Williams (1943) log-series alpha.
// f(α) = α ln(1 + N/α) rises from 0 (α → 0) towards N (α → ∞), so a finite root exists exactly when
// 0 < S < N — S = 1 included (one species among N ≥ 2 stems: a small α, as the log series says).
// Null (undefined, documented) only where no finite root exists:
//  - N = 0 (or S = 0): no sample;
//  - S = N (every species a singleton): α ln(1 + N/α) < N for every finite α, the root is at +∞.
// S > N cannot come from counts and is rejected with an error.
export function fisherAlphaFromTotals(species: number, individuals: number): number | null {
  if (!Number.isFinite(species) || !Number.isFinite(individuals) || species < 0 || individuals < 0) {
    throw new RangeError(
      `fisherAlphaFromTotals: S and N must be finite and >= 0 (got S = ${species}, N = ${individuals})`,
    );
  }
  if (species > individuals) {
    throw new RangeError(`fisherAlphaFromTotals: S cannot exceed N (got S = ${species}, N = ${individuals})`);
  }
  if (individuals <= 0 || species <= 0 || species === individuals) return null;
  const s = species;
  const n = individuals;
  // g(u) = e^u ln(1 + N e^−u) − S on u = ln α is increasing in u. Since ln(1 + x) > x/(1 + x),
  // g(ln(S N/(N − S))) > 0, which gives the upper bracket; halve α until g < 0 for the lower one.
  const g = (u: number): number => {
    const a = Math.exp(u);
    return a * Math.log1p(n / a) - s;
  };
  let hi = Math.log((s * n) / (n - s));
  let lo = hi - Math.LN2;
  for (let k = 0; g(lo) >= 0; k += 1) {
    if (k > 2000) throw new Error('fisherAlphaFromTotals: could not bracket the root');
    hi = lo;
    lo -= Math.LN2;
  }
  // Newton on u, safeguarded by bisection inside [lo, hi]; stops when a step changes α by < 1e-14
  // relative (Newton's quadratic convergence leaves the error far below the 1e-12 target).
  let u = 0.5 * (lo + hi);
  for (let iter = 0; iter < 200; iter += 1) {
    const a = Math.exp(u);
    const value = a * Math.log1p(n / a) - s;
    if (value === 0) return a;
    if (value < 0) lo = u;
    else hi = u;
    const slope = a * (Math.log1p(n / a) - n / (a + n));
    let next = u - value / slope;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    const step = Math.abs(next - u);
    u = next;
    if (step < 1e-14 || hi - lo < 1e-15) return Math.exp(u);
  }
  throw new Error(`fisherAlphaFromTotals: no convergence for S = ${s}, N = ${n}`);
}

// α from S = α ln(1 + N/α) — Fisher, Corbet & Williams (1943); see fisherAlphaFromTotals for nulls
export function fisherAlpha(counts: readonly number[]): number | null {
  const n = assertCounts('fisherAlpha', counts);
  let s = 0;
  for (const c of counts) if (c > 0) s += 1;
  return fisherAlphaFromTotals(s, n);
}

// E[Sₙ] = Σᵢ [1 − C(N − Nᵢ, n) / C(N, n)] in log-gamma form — Hurlbert (1971) rarefaction;
// null when N < n (cannot draw n individuals); n must be an integer ≥ 1.
export function rarefiedRichness(counts: readonly number[], n: number): number | null {
  const total = assertCounts('rarefiedRichness', counts);
  if (!Number.isInteger(n) || n < 1) {
    throw new RangeError(`rarefiedRichness: sample size n must be an integer >= 1 (got ${n})`);
  }
  if (total < n) return null;
  // ln[C(N − Nᵢ, n)/C(N, n)] = [lnΓ(N − Nᵢ + 1) − lnΓ(N − Nᵢ − n + 1)] − [lnΓ(N + 1) − lnΓ(N − n + 1)],
  // each bracket taken as one log-gamma ratio so that N = 1e6 or more loses no precision.
  const logDenominator = logGammaRatio(total - n + 1, n);
  let expected = 0;
  for (const c of counts) {
    if (c <= 0) continue;
    const rest = total - c;
    if (rest < n) {
      expected += 1;
      continue;
    }
    const logRatio = logGammaRatio(rest - n + 1, n) - logDenominator;
    expected += -Math.expm1(logRatio);
  }
  return expected;
}

function singletonsAndDoubletons(counts: readonly number[]): { s: number; f1: number; f2: number } {
  let s = 0;
  let f1 = 0;
  let f2 = 0;
  for (const c of counts) {
    if (c > 0) s += 1;
    if (c === 1) f1 += 1;
    else if (c === 2) f2 += 1;
  }
  return { s, f1, f2 };
}

// S + f₁(f₁ − 1) / (2 (f₂ + 1)) — Chao (1987) bias-corrected Chao1, without the (N − 1)/N factor
// (docs/methods.md#chao1-bias-corrected); null when N = 0.
export function chao1(counts: readonly number[]): number | null {
  const n = assertCounts('chao1', counts);
  if (n === 0) return null;
  const { s, f1, f2 } = singletonsAndDoubletons(counts);
  return s + (f1 * (f1 - 1)) / (2 * (f2 + 1));
}

// S + f₁² / (2 f₂) — Chao (1984) classic Chao1; = S when f₁ = 0; null when N = 0 or when f₁ > 0 and
// f₂ = 0 (the classic form is undefined there: use the bias-corrected chao1).
export function chao1Classic(counts: readonly number[]): number | null {
  const n = assertCounts('chao1Classic', counts);
  if (n === 0) return null;
  const { s, f1, f2 } = singletonsAndDoubletons(counts);
  if (f1 === 0) return s;
  if (f2 === 0) return null;
  return s + (f1 * f1) / (2 * f2);
}
