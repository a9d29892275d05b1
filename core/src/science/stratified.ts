import { EstimatorInputError } from './estimator-errors';
import { sampleMean, sampleVariance } from './sample-moments';
import { tMultiplier } from './student-t';

// Stratified random sampling estimators (Cochran 1977, Sampling Techniques 3rd ed., ch. 5).
// Formulas and check values: docs/methods.md#stratified-estimator and the sections after it.
//
// Decisions, stated once here and repeated in the result so a report can say them:
// - Weights W_h = N_h / N from stratum sizes (forest areas) when every stratum has one
//   (`weighting: 'area'`); without sizes W_h = n_h / n (`weighting: 'plot_count'`), which is unbiased
//   only if plots were allocated in proportion to area (a self-weighting design).
// - Values that are null are left out; n_h counts only the values present. A stratum with no value
//   is left out of the estimate and the weights of the others are renormalised: the estimate then
//   covers only the strata it names (`strataUsed`, `size`).
// - No finite population correction by default (plots are a negligible share of forest area);
//   `fpcUnitSize` turns it on with N_h = size / fpcUnitSize sampling units and f_h = n_h / N_h.
// - A stratum with one value has no variance estimate: its SE is null, and so are the SE, CI and
//   sampling error of the stratified estimate (the mean is still given). Strata are not collapsed:
//   which strata to merge is a design decision for people, listed in `singleValueStrata`.
// - Degrees of freedom: Satterthwaite's effective df for the stratified estimate (for one stratum it
//   reduces to n − 1); n_h − 1 for each stratum's own interval. When every s_h² is 0 the Satterthwaite
//   ratio is 0/0; n − H is used then (the interval has zero width whatever the df).
// - Sampling error % = 100 · m · SE / |ȳ|, m the two-sided t at the df above ('t', default) or a fixed
//   1.96 or 2 (protocols differ; both are 95 % conventions, so they require confidence 0.95).

export type Weighting = 'area' | 'plot_count';
export type SamplingErrorT = 't' | 1.96 | 2;

/** A stratum given by its plots' values. */
export interface StratumValues {
  readonly name: string;
  /** One value per plot; null = no value for that plot, left out (n_h counts values present). */
  readonly values: readonly (number | null)[];
  /** Stratum size N_h (forest area in ha here); null/absent when unknown. */
  readonly size?: number | null;
}

/** The sufficient statistics of a stratum's values (stratumMoments): n_h, ȳ_h (null when n_h = 0), s_h² (null when n_h < 2). */
export interface StratumMoments {
  readonly n: number;
  readonly mean: number | null;
  readonly variance: number | null;
}

/** A stratum given by the moments of its values instead of the values: the same estimate, to the last bit, as from the values they came from. */
export interface StratumSummary extends StratumMoments {
  readonly name: string;
  readonly size?: number | null;
}

export type StratumInput = StratumValues | StratumSummary;

export interface StratifiedOptions {
  /** Confidence level of the intervals. Default 0.95. */
  readonly confidence?: number;
  /** Multiplier of the sampling error %: 't' (Student t at the df used, default), 1.96 or 2. */
  readonly samplingErrorT?: SamplingErrorT;
  /** Degrees of freedom of the stratified interval: 'satterthwaite' (default) or a fixed number. */
  readonly df?: 'satterthwaite' | number;
  /** Default: 'area' when every stratum has a size, 'plot_count' when none has; must be given when
   * only some have (sizes are then still used for stratum totals). */
  readonly weighting?: Weighting;
  /** Size of one sampling unit in the unit of `size` (the plot area in ha when sizes are in ha).
   * Given: the finite population correction is applied (area weighting only). Default: not applied. */
  readonly fpcUnitSize?: number;
}

export interface StratumEstimate {
  readonly name: string;
  readonly n: number;
  readonly mean: number | null;
  /** Sample variance s_h² (null for n_h < 2). */
  readonly variance: number | null;
  readonly se: number | null;
  /** n_h − 1, the df of this stratum's own interval. */
  readonly df: number | null;
  readonly ciLow: number | null;
  readonly ciHigh: number | null;
  readonly samplingErrorPct: number | null;
  /** W_h in the stratified estimate (null when the stratum has no value). */
  readonly weight: number | null;
  readonly size: number | null;
  /** ȳ_h · N_h with its SE and interval, when the size is known. */
  readonly total: number | null;
  readonly totalSe: number | null;
  readonly totalCiLow: number | null;
  readonly totalCiHigh: number | null;
}

export interface StratifiedEstimate {
  readonly weighting: Weighting;
  readonly fpcApplied: boolean;
  readonly confidence: number;
  readonly n: number;
  readonly mean: number | null;
  readonly variance: number | null;
  readonly se: number | null;
  readonly df: number | null;
  readonly dfMethod: 'satterthwaite' | 'n_minus_strata' | 'fixed' | null;
  readonly tMultiplier: number | null;
  readonly samplingErrorMultiplier: number | null;
  readonly ciLow: number | null;
  readonly ciHigh: number | null;
  readonly samplingErrorPct: number | null;
  /** Σ N_h over the strata used (area weighting), else null. */
  readonly size: number | null;
  readonly total: number | null;
  readonly totalSe: number | null;
  readonly totalCiLow: number | null;
  readonly totalCiHigh: number | null;
  readonly strataUsed: readonly string[];
  readonly strataWithoutValues: readonly string[];
  readonly singleValueStrata: readonly string[];
  readonly strata: readonly StratumEstimate[];
}

function assertSameLength(fn: string, ...arrays: readonly (readonly number[])[]): void {
  const n = arrays[0].length;
  if (n === 0) throw new EstimatorInputError(fn, 'EMPTY_SAMPLE', 'needs at least one stratum');
  for (const a of arrays) {
    if (a.length !== n) throw new EstimatorInputError(fn, 'LENGTH_MISMATCH', `arrays differ in length (${n} vs ${a.length})`);
  }
}

function assertWeights(fn: string, weights: readonly number[]): void {
  let sum = 0;
  for (const w of weights) {
    if (!(w >= 0) || !Number.isFinite(w)) throw new EstimatorInputError(fn, 'BAD_WEIGHTS', `weight ${String(w)} is not a finite non-negative number`);
    sum += w;
  }
  if (Math.abs(sum - 1) > 1e-9) throw new EstimatorInputError(fn, 'BAD_WEIGHTS', `weights sum to ${sum}, not 1`);
}

// ȳ_st = Σ W_h ȳ_h (Cochran 1977, Sampling Techniques 3rd ed., ch. 5)
export function stratifiedMean(weights: readonly number[], means: readonly number[]): number {
  assertSameLength('stratifiedMean', weights, means);
  assertWeights('stratifiedMean', weights);
  let m = 0;
  for (let h = 0; h < weights.length; h++) m += weights[h] * means[h];
  if (!Number.isFinite(m)) throw new EstimatorInputError('stratifiedMean', 'NON_FINITE_VALUE', 'a stratum mean is not finite');
  return m;
}

// a_h = W_h² (1 − f_h) s_h² / n_h, the stratum's share of v(ȳ_st) (Cochran 1977 ch. 5, eq. 5.6 family; f_h = 0 without fpc)
function varianceTerms(fn: string, weights: readonly number[], variances: readonly number[], ns: readonly number[], fractions: readonly number[]): number[] {
  assertSameLength(fn, weights, variances, ns, fractions);
  assertWeights(fn, weights);
  return weights.map((w, h) => {
    const s2 = variances[h];
    const n = ns[h];
    const f = fractions[h];
    if (!(s2 >= 0) || !Number.isFinite(s2)) throw new EstimatorInputError(fn, 'NON_FINITE_VALUE', `variance of stratum ${h} is ${String(s2)}`);
    if (!Number.isInteger(n) || n < 2) throw new EstimatorInputError(fn, 'EMPTY_SAMPLE', `stratum ${h} has n = ${n}; a variance needs n ≥ 2`);
    if (!(f >= 0 && f <= 1)) throw new EstimatorInputError(fn, 'BAD_OPTION', `sampling fraction of stratum ${h} is ${String(f)}, not in [0, 1]`);
    return (w * w * (1 - f) * s2) / n;
  });
}

// v(ȳ_st) = Σ W_h² (1 − f_h) s_h² / n_h; pass f_h = 0 for no finite population correction (Cochran 1977 ch. 5, eq. 5.6 family)
export function stratifiedVariance(weights: readonly number[], variances: readonly number[], ns: readonly number[], fractions: readonly number[]): number {
  const terms = varianceTerms('stratifiedVariance', weights, variances, ns, fractions);
  let v = 0;
  for (const t of terms) v += t;
  return v;
}

// n_e = (Σ a_h)² / Σ [a_h² / (n_h − 1)], a_h = W_h² (1 − f_h) s_h² / n_h (Satterthwaite 1946, Biometrics Bull. 2:110; Cochran 1977 eq. 5.16)
export function satterthwaiteDf(weights: readonly number[], variances: readonly number[], ns: readonly number[], fractions: readonly number[]): number {
  const terms = varianceTerms('satterthwaiteDf', weights, variances, ns, fractions);
  let num = 0;
  let den = 0;
  for (let h = 0; h < terms.length; h++) {
    num += terms[h];
    den += (terms[h] * terms[h]) / (ns[h] - 1);
  }
  if (!(num > 0)) throw new EstimatorInputError('satterthwaiteDf', 'EMPTY_SAMPLE', 'every stratum variance term is 0; the effective df is undefined');
  return (num * num) / den;
}

// SE% = 100 · m · SE / |ȳ|, the sampling error in percent of the mean (common practice in forest inventory; m per protocol)
export function samplingErrorPercent(multiplier: number, se: number, mean: number): number | null {
  if (!(multiplier > 0) || !Number.isFinite(multiplier) || !(se >= 0) || !Number.isFinite(se) || !Number.isFinite(mean)) {
    throw new EstimatorInputError('samplingErrorPercent', 'NON_FINITE_VALUE', `needs a positive multiplier, SE ≥ 0 and a finite mean (got ${multiplier}, ${se}, ${mean})`);
  }
  return mean === 0 ? null : (100 * multiplier * se) / Math.abs(mean);
}

interface Resolved {
  readonly confidence: number;
  readonly samplingErrorT: SamplingErrorT;
  readonly df: 'satterthwaite' | number;
  readonly weighting: Weighting;
  readonly fpcUnitSize: number | null;
}

// Throws unless confidence ∈ (0, 1), samplingErrorT ∈ {'t', 1.96, 2} (the fixed ones at confidence 0.95 only), df and fpcUnitSize positive.
export function assertStratifiedOptions(options: StratifiedOptions): void {
  const fn = 'stratifiedEstimate';
  const confidence = options.confidence ?? 0.95;
  if (!(confidence > 0 && confidence < 1)) throw new EstimatorInputError(fn, 'BAD_OPTION', `confidence must lie strictly between 0 and 1, got ${String(confidence)}`);
  const samplingErrorT = options.samplingErrorT ?? 't';
  if (samplingErrorT !== 't' && samplingErrorT !== 1.96 && samplingErrorT !== 2) {
    throw new EstimatorInputError(fn, 'BAD_OPTION', `samplingErrorT must be 't', 1.96 or 2, got ${String(samplingErrorT)}`);
  }
  if (samplingErrorT !== 't' && confidence !== 0.95) {
    throw new EstimatorInputError(fn, 'BAD_OPTION', `samplingErrorT ${samplingErrorT} is a 95 % convention; it cannot go with confidence ${confidence}`);
  }
  const df = options.df ?? 'satterthwaite';
  if (df !== 'satterthwaite' && (typeof df !== 'number' || !(df > 0) || !Number.isFinite(df))) {
    throw new EstimatorInputError(fn, 'BAD_OPTION', `df must be 'satterthwaite' or a finite positive number, got ${String(df)}`);
  }
  const w = options.weighting;
  if (w !== undefined && w !== 'area' && w !== 'plot_count') throw new EstimatorInputError(fn, 'BAD_OPTION', `weighting must be 'area' or 'plot_count', got ${String(w)}`);
  const unit = options.fpcUnitSize;
  if (unit !== undefined && (!(unit > 0) || !Number.isFinite(unit))) {
    throw new EstimatorInputError(fn, 'BAD_OPTION', `fpcUnitSize must be a finite positive number, got ${String(unit)}`);
  }
}

function resolveOptions(strata: readonly StratumInput[], options: StratifiedOptions): Resolved {
  const fn = 'stratifiedEstimate';
  assertStratifiedOptions(options);
  const confidence = options.confidence ?? 0.95;
  const samplingErrorT = options.samplingErrorT ?? 't';
  const df = options.df ?? 'satterthwaite';
  const unit = options.fpcUnitSize;
  const withSize = strata.filter((s) => s.size !== null && s.size !== undefined).length;
  const weighting = options.weighting ?? (withSize === strata.length ? 'area' : withSize === 0 ? 'plot_count' : null);
  if (weighting === null) {
    throw new EstimatorInputError(fn, 'BAD_OPTION', `${withSize} of ${strata.length} strata have a size; pass weighting 'plot_count' explicitly or give every size`);
  }
  if (weighting === 'area' && withSize !== strata.length) {
    throw new EstimatorInputError(fn, 'BAD_OPTION', "weighting 'area' needs a size on every stratum");
  }
  return { confidence, samplingErrorT, df, weighting, fpcUnitSize: weighting === 'area' && unit !== undefined ? unit : null };
}

// n_h = number of values present, ȳ_h = Σ y / n_h, s_h² = Σ (y − ȳ_h)² / (n_h − 1) over them, nulls left out (Cochran 1977 ch. 2 and 5)
export function stratumMoments(values: readonly (number | null)[], name = 'stratum'): StratumMoments {
  const x: number[] = [];
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v === null) continue;
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new EstimatorInputError('stratifiedEstimate', 'NON_FINITE_VALUE', `stratum '${name}' value ${i} is ${String(v)}, not a finite number or null`);
    }
    x.push(v);
  }
  return { n: x.length, mean: x.length > 0 ? sampleMean(x) : null, variance: x.length > 1 ? sampleVariance(x) : null };
}

// Moments given directly must be what stratumMoments gives: an integer n ≥ 0, a finite mean iff n ≥ 1, a finite variance ≥ 0 iff n ≥ 2.
function givenMoments(s: StratumSummary): StratumMoments {
  const bad = (what: string) => new EstimatorInputError('stratifiedEstimate', 'BAD_STRATUM', `stratum '${s.name}' ${what}`);
  if (!Number.isInteger(s.n) || s.n < 0) throw bad(`has n = ${String(s.n)}; n must be an integer ≥ 0`);
  if (s.n === 0 ? s.mean !== null : typeof s.mean !== 'number' || !Number.isFinite(s.mean)) throw bad(`has n = ${s.n} and mean ${String(s.mean)}`);
  if (s.n < 2 ? s.variance !== null : typeof s.variance !== 'number' || !Number.isFinite(s.variance) || s.variance < 0) throw bad(`has n = ${s.n} and variance ${String(s.variance)}`);
  return { n: s.n, mean: s.mean, variance: s.variance };
}

const momentsOf = (s: StratumInput): StratumMoments => ('values' in s ? stratumMoments(s.values, s.name) : givenMoments(s));

function interval(centre: number, halfWidth: number): [number, number] {
  return [centre - halfWidth, centre + halfWidth];
}

// ȳ_st = Σ W_h ȳ_h, v = Σ W_h² (1 − f_h) s_h²/n_h, df = Satterthwaite n_e, CI = ȳ_st ± t·SE (Cochran 1977 ch. 5, eq. 5.6 family and eq. 5.16)
export function stratifiedEstimate(strata: readonly StratumInput[], options: StratifiedOptions = {}): StratifiedEstimate {
  const fn = 'stratifiedEstimate';
  if (strata.length === 0) throw new EstimatorInputError(fn, 'EMPTY_SAMPLE', 'needs at least one stratum');
  const names = new Set<string>();
  for (const s of strata) {
    if (names.has(s.name)) throw new EstimatorInputError(fn, 'BAD_STRATUM', `stratum '${s.name}' is given twice`);
    names.add(s.name);
    if (s.size !== null && s.size !== undefined && (!(s.size > 0) || !Number.isFinite(s.size))) {
      throw new EstimatorInputError(fn, 'BAD_STRATUM', `stratum '${s.name}' has size ${String(s.size)}; a size must be finite and positive`);
    }
  }
  const opt = resolveOptions(strata, options);
  // Each stratum enters by its moments only: n_h, ȳ_h and s_h², from its values or as given.
  const moments = strata.map(momentsOf);
  const sizeOf = (h: number): number | null => strata[h].size ?? null;

  const used: number[] = [];
  moments.forEach((m, h) => {
    if (m.n > 0) used.push(h);
  });
  const usedWeightBasis = used.map((h) => (opt.weighting === 'area' ? (sizeOf(h) as number) : moments[h].n));
  const basisTotal = usedWeightBasis.reduce((a, b) => a + b, 0);
  const weights = new Map<number, number>(used.map((h, i) => [h, usedWeightBasis[i] / basisTotal]));

  const fraction = (h: number): number => {
    if (opt.fpcUnitSize === null) return 0;
    const units = (sizeOf(h) as number) / opt.fpcUnitSize;
    const f = moments[h].n / units;
    if (f > 1) throw new EstimatorInputError(fn, 'BAD_STRATUM', `stratum '${strata[h].name}' has ${moments[h].n} plots but room for only ${units} units`);
    return f;
  };

  const stratumResults: StratumEstimate[] = strata.map((s, h) => {
    const { n, mean, variance } = moments[h];
    const size = sizeOf(h);
    const se = variance === null ? null : Math.sqrt(((1 - fraction(h)) * variance) / n);
    const df = n > 1 ? n - 1 : null;
    const t = df === null ? null : tMultiplier(opt.confidence, df);
    const [ciLow, ciHigh] = se === null || t === null || mean === null ? [null, null] : interval(mean, t * se);
    const m = opt.samplingErrorT === 't' ? t : opt.samplingErrorT;
    const total = mean !== null && size !== null ? mean * size : null;
    const totalSe = se !== null && size !== null ? se * size : null;
    const [totalCiLow, totalCiHigh] = total === null || totalSe === null || t === null ? [null, null] : interval(total, t * totalSe);
    return {
      name: s.name,
      n,
      mean,
      variance,
      se,
      df,
      ciLow,
      ciHigh,
      samplingErrorPct: se === null || mean === null || m === null ? null : samplingErrorPercent(m, se, mean),
      weight: weights.get(h) ?? null,
      size,
      total,
      totalSe,
      totalCiLow,
      totalCiHigh,
    };
  });

  const singleValueStrata = used.filter((h) => moments[h].n === 1).map((h) => strata[h].name);
  const base = {
    weighting: opt.weighting,
    fpcApplied: opt.fpcUnitSize !== null,
    confidence: opt.confidence,
    strataUsed: used.map((h) => strata[h].name),
    strataWithoutValues: strata.filter((_, h) => moments[h].n === 0).map((s) => s.name),
    singleValueStrata,
    strata: stratumResults,
  };
  const n = used.reduce((a, h) => a + moments[h].n, 0);
  const size = opt.weighting === 'area' && used.length > 0 ? used.reduce((a, h) => a + (sizeOf(h) as number), 0) : null;
  const none = { variance: null, se: null, df: null, dfMethod: null, tMultiplier: null, samplingErrorMultiplier: null, ciLow: null, ciHigh: null, samplingErrorPct: null, totalSe: null, totalCiLow: null, totalCiHigh: null } as const;
  if (used.length === 0) return { ...base, ...none, n: 0, mean: null, size: null, total: null };

  const w = used.map((h) => weights.get(h) as number);
  const mean = stratifiedMean(w, used.map((h) => stratumResults[h].mean as number));
  const total = size === null ? null : mean * size;
  if (singleValueStrata.length > 0) return { ...base, ...none, n, mean, size, total };

  const s2 = used.map((h) => stratumResults[h].variance as number);
  const ns = used.map((h) => moments[h].n);
  const f = used.map(fraction);
  const variance = stratifiedVariance(w, s2, ns, f);
  const se = Math.sqrt(variance);
  let df: number;
  let dfMethod: 'satterthwaite' | 'n_minus_strata' | 'fixed';
  if (opt.df !== 'satterthwaite') {
    df = opt.df;
    dfMethod = 'fixed';
  } else if (variance > 0) {
    df = satterthwaiteDf(w, s2, ns, f);
    dfMethod = 'satterthwaite';
  } else {
    df = n - used.length;
    dfMethod = 'n_minus_strata';
  }
  const t = tMultiplier(opt.confidence, df);
  const m = opt.samplingErrorT === 't' ? t : opt.samplingErrorT;
  const [ciLow, ciHigh] = interval(mean, t * se);
  const totalSe = size === null ? null : se * size;
  const [totalCiLow, totalCiHigh] = total === null || totalSe === null ? [null, null] : interval(total, t * totalSe);
  return {
    ...base,
    n,
    mean,
    variance,
    se,
    df,
    dfMethod,
    tMultiplier: t,
    samplingErrorMultiplier: m,
    ciLow,
    ciHigh,
    samplingErrorPct: samplingErrorPercent(m, se, mean),
    size,
    total,
    totalSe,
    totalCiLow,
    totalCiHigh,
  };
}
