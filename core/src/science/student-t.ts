// Student t distribution: thin wrappers over the maintained @stdlib implementations (no approximation of our own).
// Check values: docs/methods.md#student-t.
import tCdf from '@stdlib/stats-base-dists-t-cdf';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import { logGamma } from './log-gamma';

// Throws naming the function when the degrees of freedom are not positive and finite.
function checkDf(fn: string, df: number): void {
  if (!(df > 0) || !Number.isFinite(df)) throw new RangeError(`${fn}: degrees of freedom must be positive and finite, got ${df}`);
}

// F(t; ν) = P(T ≤ t) for Student's t with ν degrees of freedom (stdlib, regularised incomplete beta).
export function studentTCdf(t: number, df: number): number {
  checkDf('studentTCdf', df);
  if (Number.isNaN(t)) throw new RangeError('studentTCdf: t is NaN');
  return tCdf(t, df);
}

// p = 2·F(−|t|; ν), the two-sided p-value of a t statistic (evaluated in the lower tail to keep small p exact).
export function studentTTwoSidedP(t: number, df: number): number {
  checkDf('studentTTwoSidedP', df);
  if (Number.isNaN(t)) throw new RangeError('studentTTwoSidedP: t is NaN');
  return Math.min(1, 2 * tCdf(-Math.abs(t), df));
}

// t_{p,ν} = F⁻¹(p; ν), the p-quantile of Student's t (stdlib).
export function studentTQuantile(p: number, df: number): number {
  checkDf('studentTQuantile', df);
  if (!(p > 0 && p < 1)) throw new RangeError(`studentTQuantile: p must be in (0, 1), got ${p}`);
  return tQuantile(p, df);
}

// The multipliers computed so far by confidence and df: a summary asks for the same few (n_h − 1 of its
// strata) hundreds of times, and each costs an iterative inversion. Bounded; the values are those computed.
const multipliers = new Map<number, Map<number, number>>();
let remembered = 0;

// t = F⁻¹_ν((1 + c)/2), two-sided Student t multiplier at confidence c and ν degrees of freedom (Student 1908, Biometrika 6:1–25)
export function tMultiplier(confidence: number, df: number): number {
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`tMultiplier: confidence must lie strictly between 0 and 1, got ${String(confidence)}`);
  checkDf('tMultiplier', df);
  let byDf = multipliers.get(confidence);
  const known = byDf?.get(df);
  if (known !== undefined) return known;
  const t = tQuantile((1 + confidence) / 2, df);
  if (remembered >= 10_000) {
    multipliers.clear();
    remembered = 0;
    byDf = undefined;
  }
  if (byDf === undefined) multipliers.set(confidence, (byDf = new Map()));
  byDf.set(df, t);
  remembered++;
  return t;
}

// f(t; ν) = Γ((ν+1)/2) / (√(νπ) Γ(ν/2)) · (1 + t²/ν)^(−(ν+1)/2), the density of Student's t (Student 1908, Biometrika 6:1–25)
export function studentTDensity(t: number, df: number): number {
  checkDf('studentTDensity', df);
  const logC = logGamma((df + 1) / 2) - logGamma(df / 2) - 0.5 * Math.log(df * Math.PI);
  return Math.exp(logC - ((df + 1) / 2) * Math.log1p((t * t) / df));
}
