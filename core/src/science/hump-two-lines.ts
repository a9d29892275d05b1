// The two-lines test of a hump (Simonsohn 2018, Advances in Methods and Practices in Psychological
// Science 1:538–555): fit two separate lines, before and after a breakpoint chosen near the top of
// a flexible fit, and ask whether the first rises and the second falls, both significantly.
//
// By default it follows the published procedure in where the top and the breakpoint may lie (the middle
// 80 % of x), and differs from it in the flexible fit (a cubic polynomial, a quadratic for 3 distinct x
// or 5 points or fewer, instead of a smoothing spline), the shape being fixed beforehand by the
// parabola's b₂, one interrupted regression instead of two, and Student t instead of normal p-values.
// `TwoLinesOptions` switches each choice; docs/methods.md#where-it-differs-from-the-published-procedure
// lists the differences with their measured effect (scripts/bench/two-lines.ts).
//  1. flat region = the observed x between the 10th and 90th percentiles of x whose fitted value is within
//     1 SE of the highest fitted value there (ŷᵢ + SEᵢ ≥ max ŷ; for a U, ŷᵢ − SEᵢ ≤ min ŷ);
//  2. interrupted regression at the median of the flat region: y = a + b₁·x_low + b₂·x_high + c·high,
//     x_low = x − x_c for x ≤ x_c (else 0), x_high = x − x_c for x > x_c (else 0), high = [x > x_c];
//  3. "Robin Hood": move the breakpoint to the q-quantile of the flat region, q = |t₂|/(|t₁| + |t₂|) from the slopes' t values,
//     which gives more data to the line whose slope is the less significant;
//  4. refit there with HC3 robust standard errors; a hump needs b₁ > 0 and b₂ < 0 with both
//     two-sided p < α (a U the mirror).
// Each line needs at least MIN_POINTS_PER_LINE points with two distinct x and some residual scatter,
// else the test is not testable: `reason` says why and `passes` is false (never an exception).
import { quantileSorted } from './bootstrap';
import type { CurveShape } from './hump';
import { normalTwoSidedP } from './normal';
import { fitOls, fitPolynomial, predictOls, predictPolynomial, RegressionError } from './regression';
import { restrictedCubicSplineColumns, splineKnots } from './spline';

export const MIN_POINTS_PER_LINE = 3;

export interface LineSegment {
  readonly n: number;
  readonly slope: number;
  /** HC3 robust standard error. */
  readonly se: number;
  readonly t: number;
  readonly p: number;
}

export interface TwoLinesResult {
  readonly shape: CurveShape;
  readonly breakpoint: number | null;
  /** The x range of the flat region of the flexible fit. */
  readonly flatLow: number | null;
  readonly flatHigh: number | null;
  readonly first: LineSegment | null;
  readonly second: LineSegment | null;
  readonly passes: boolean;
  /** Why the test could not be run; null when it ran. */
  readonly reason: string | null;
}

// Interrupted regression y = a + b₁x_low + b₂x_high + c·high with HC3 SEs (Simonsohn 2018, eq. for "two lines"); null if a line is not estimable.
export function interruptedRegression(x: readonly number[], y: readonly number[], breakpoint: number): { first: LineSegment; second: LineSegment } | null {
  const out = splitLines(x, y, breakpoint);
  return 'reason' in out ? null : out;
}

// The interrupted regression, or why it cannot be tested at this breakpoint (too few points or distinct x on a side, a singular design, no residual scatter).
function splitLines(x: readonly number[], y: readonly number[], breakpoint: number): { first: LineSegment; second: LineSegment } | { reason: string } {
  const n = x.length;
  const xLow = new Array<number>(n);
  const xHigh = new Array<number>(n);
  const high = new Array<number>(n);
  const lowXs = new Set<number>();
  const highXs = new Set<number>();
  let nLow = 0;
  for (let i = 0; i < n; i++) {
    const isHigh = x[i] > breakpoint;
    xLow[i] = isHigh ? 0 : x[i] - breakpoint;
    xHigh[i] = isHigh ? x[i] - breakpoint : 0;
    high[i] = isHigh ? 1 : 0;
    if (isHigh) highXs.add(x[i]);
    else {
      lowXs.add(x[i]);
      nLow++;
    }
  }
  const nHigh = n - nLow;
  if (nLow < MIN_POINTS_PER_LINE || nHigh < MIN_POINTS_PER_LINE || lowXs.size < 2 || highXs.size < 2) {
    return { reason: `too few points on one side of the breakpoint (a line needs ${MIN_POINTS_PER_LINE} points at 2 distinct x or more)` };
  }
  let fit;
  try {
    fit = fitOls(y, [xLow, xHigh, high], { hc3: true });
  } catch (e) {
    if (e instanceof RegressionError) return { reason: e.message };
    throw e;
  }
  const hc3 = fit.hc3!;
  const segment = (k: number, count: number): LineSegment => ({
    n: count,
    slope: fit.coefficients[k],
    se: hc3.standardErrors[k],
    t: hc3.tValues[k],
    p: hc3.pValues[k],
  });
  return { first: segment(1, nLow), second: segment(2, nHigh) };
}

/** How the test is run where stemwise's default and the published procedure differ (docs/methods.md#where-it-differs-from-the-published-procedure). */
export interface TwoLinesOptions {
  /** Significance level of each slope; default 0.05. */
  readonly alpha?: number;
  /** The flexible fit: 'cubic' polynomial (default) or 'spline', a restricted cubic spline with knots at quantiles of x. */
  readonly smooth?: 'cubic' | 'spline';
  /** Where the top and the breakpoint may lie: 'middle80' only between the 10th and 90th percentiles of x (default, as published), 'flat' anywhere in the flat region. */
  readonly range?: 'flat' | 'middle80';
  /** 'one' interrupted regression, points at the breakpoint in the first line (default); 'each': two, each line's slope from the run whose line holds them. */
  readonly split?: 'one' | 'each';
  /** p-values of the slopes: 't' Student t with the residual df (default) or 'normal' (z); the Robin Hood rule reads |t| = |z| either way. */
  readonly pValues?: 't' | 'normal';
}

/** The choices of the published procedure, as far as this code can follow it (the flexible fit is a spline, not a penalised one). */
export const PUBLISHED_TWO_LINES: Required<Omit<TwoLinesOptions, 'alpha'>> = { smooth: 'spline', range: 'middle80', split: 'each', pValues: 'normal' };

// Both lines: from one regression, or each from the run that puts the points at x = x_c in that line (Simonsohn 2018 reference code, from memory).
function twoLinesAt(x: readonly number[], y: readonly number[], xc: number, split: 'one' | 'each'): { first: LineSegment; second: LineSegment } | { reason: string } {
  const one = splitLines(x, y, xc);
  if (split === 'one' || 'reason' in one) return one;
  // the largest observed x below x_c as the break puts exactly the points at x_c into the second line
  let below = -Infinity;
  for (const v of x) if (v < xc && v > below) below = v;
  const other = splitLines(x, y, below);
  return 'reason' in other ? other : { first: one.first, second: other.second };
}

// A line's p from its t: Student t with the regression's df, or the normal.
function withP(line: LineSegment, pValues: 't' | 'normal'): LineSegment {
  return pValues === 't' ? line : { ...line, p: normalTwoSidedP(line.t) };
}

// ŷ and its SE at each observed x from the flexible fit (cubic, or restricted cubic spline falling back to the cubic when the knots tie).
function flexibleFit(x: readonly number[], y: readonly number[], smooth: 'cubic' | 'spline'): { fitted: Float64Array; ses: Float64Array } {
  const n = x.length;
  const fitted = new Float64Array(n);
  const ses = new Float64Array(n);
  const distinct = new Set(x).size;
  if (smooth === 'spline' && distinct >= 10 && n >= 20) {
    const knots = splineKnots(x, n >= 100 ? 5 : 4);
    if (knots.every((t, j) => j === 0 || t > knots[j - 1])) {
      const columns = restrictedCubicSplineColumns(x, knots);
      const fit = fitOls(y, columns);
      for (let i = 0; i < n; i++) {
        const { mean, se } = predictOls(fit, columns.map((c) => c[i]));
        fitted[i] = mean;
        ses[i] = se;
      }
      return { fitted, ses };
    }
  }
  const poly = fitPolynomial(x, y, distinct >= 4 && n > 5 ? 3 : 2);
  for (let i = 0; i < n; i++) {
    const { mean, se } = predictPolynomial(poly, x[i]);
    fitted[i] = mean;
    ses[i] = se;
  }
  return { fitted, ses };
}

// Two-lines test with the Robin Hood breakpoint (Simonsohn 2018; the defaults differ as the header says, `options` can follow the published choices).
export function twoLinesTest(x: readonly number[], y: readonly number[], shape: CurveShape, alphaOrOptions: number | TwoLinesOptions = {}): TwoLinesResult {
  const fn = 'twoLinesTest';
  const options: TwoLinesOptions = typeof alphaOrOptions === 'number' ? { alpha: alphaOrOptions } : alphaOrOptions;
  const alpha = options.alpha ?? 0.05;
  const split = options.split ?? 'one';
  const pValues = options.pValues ?? 't';
  if (x.length !== y.length) throw new RangeError(`${fn}: x has ${x.length} values, y has ${y.length}`);
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`${fn}: alpha must be in (0, 1), got ${alpha}`);
  const none = (reason: string, extra: Partial<TwoLinesResult> = {}): TwoLinesResult => ({
    shape,
    breakpoint: null,
    flatLow: null,
    flatHigh: null,
    first: null,
    second: null,
    passes: false,
    reason,
    ...extra,
  });
  const distinct = new Set(x).size;
  if (distinct < 3) return none('fewer than 3 distinct x values');
  let smooth;
  try {
    smooth = flexibleFit(x, y, options.smooth ?? 'cubic');
  } catch (e) {
    if (e instanceof RegressionError) return none(`flexible fit failed: ${e.message}`);
    throw e;
  }
  const { fitted, ses } = smooth;
  const n = x.length;
  let lo = -Infinity;
  let hi = Infinity;
  if ((options.range ?? 'middle80') === 'middle80') {
    const sortedX = Float64Array.from(x).sort();
    lo = quantileSorted(sortedX, 0.1);
    hi = quantileSorted(sortedX, 0.9);
  }
  const inRange = (i: number): boolean => x[i] >= lo && x[i] <= hi;
  let extreme = shape === 'hump' ? -Infinity : Infinity;
  for (let i = 0; i < n; i++) {
    if (!inRange(i)) continue;
    extreme = shape === 'hump' ? Math.max(extreme, fitted[i]) : Math.min(extreme, fitted[i]);
  }
  const flat: number[] = [];
  for (let i = 0; i < n; i++) {
    const within = shape === 'hump' ? fitted[i] + ses[i] >= extreme : fitted[i] - ses[i] <= extreme;
    if (within && inRange(i)) flat.push(x[i]);
  }
  const flatSorted = Float64Array.from(flat).sort();
  const flatLow = flatSorted[0];
  const flatHigh = flatSorted[flatSorted.length - 1];
  const median = quantileSorted(flatSorted, 0.5);
  const first = twoLinesAt(x, y, median, split);
  if ('reason' in first) return none(`${first.reason} (the median breakpoint)`, { flatLow, flatHigh, breakpoint: median });
  const z1 = Math.abs(first.first.t);
  const z2 = Math.abs(first.second.t);
  const q = z1 + z2 > 0 ? z2 / (z1 + z2) : 0.5;
  const breakpoint = quantileSorted(flatSorted, q);
  const lines = twoLinesAt(x, y, breakpoint, split);
  if ('reason' in lines) return none(`${lines.reason} (the Robin Hood breakpoint)`, { flatLow, flatHigh, breakpoint });
  const line1 = withP(lines.first, pValues);
  const line2 = withP(lines.second, pValues);
  const sign = shape === 'hump' ? 1 : -1;
  const passes = sign * line1.slope > 0 && sign * line2.slope < 0 && line1.p < alpha && line2.p < alpha;
  return { shape, breakpoint, flatLow, flatHigh, first: line1, second: line2, passes, reason: null };
}
